package gemm

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/blas/gonum"
)

var transposes = []blas.Transpose{blas.NoTrans, blas.Trans}

// kernels runs f once per kernel this build and machine has: the portable
// one, and the assembly one where Accelerated.
func kernels(t *testing.T, f func(t *testing.T)) {
	t.Helper()
	prev := UsePortable(true)
	defer UsePortable(prev)
	t.Run("portable", f)
	UsePortable(false)
	if !Accelerated() {
		t.Log("no assembly kernel in this build or on this CPU")
		return
	}
	t.Run("asm", f)
}

// randGeneral returns an r×c matrix with stride c+pad, entries uniform in
// [−1, 1), and the padding set to NaN so that reading it shows.
func randGeneral(rng *rand.Rand, r, c, pad int) blas64.General {
	s := c + pad
	d := make([]float64, max(r*s, 1))
	for i := range d {
		if s == 0 || i%s >= c {
			d[i] = math.NaN()
			continue
		}
		d[i] = 2*rng.Float64() - 1
	}
	return blas64.General{Rows: r, Cols: c, Stride: s, Data: d}
}

func clone(g blas64.General) blas64.General {
	g.Data = append([]float64(nil), g.Data...)
	return g
}

// operands returns A and B stored so that op(A) is m×k and op(B) is k×n.
func operands(rng *rand.Rand, tA, tB blas.Transpose, m, n, k, pad int) (a, b blas64.General) {
	if tA == blas.NoTrans {
		a = randGeneral(rng, m, k, pad)
	} else {
		a = randGeneral(rng, k, m, pad)
	}
	if tB == blas.NoTrans {
		b = randGeneral(rng, k, n, pad)
	} else {
		b = randGeneral(rng, n, k, pad)
	}
	return a, b
}

func at(g blas64.General, t blas.Transpose, i, j int) float64 {
	if t == blas.NoTrans {
		return g.Data[i*g.Stride+j]
	}
	return g.Data[j*g.Stride+i]
}

// naive returns alpha·op(A)·op(B) + beta·C by the textbook triple loop, and
// for each element the bound Σ_p |alpha·a_ip·b_pj| + |beta·c_ij| on the
// magnitudes that enter it.
func naive(tA, tB blas.Transpose, alpha float64, a, b blas64.General, beta float64, c blas64.General, k int) (ref, mag []float64) {
	m, n := c.Rows, c.Cols
	ref = make([]float64, m*n)
	mag = make([]float64, m*n)
	for i := 0; i < m; i++ {
		for j := 0; j < n; j++ {
			s, u := 0.0, 0.0
			for p := 0; p < k; p++ {
				x := at(a, tA, i, p) * at(b, tB, p, j)
				s += x
				u += math.Abs(x)
			}
			v := alpha * s
			u = math.Abs(alpha) * u
			if beta != 0 {
				v += beta * c.Data[i*c.Stride+j]
				u += math.Abs(beta * c.Data[i*c.Stride+j])
			}
			ref[i*n+j], mag[i*n+j] = v, u
		}
	}
	return ref, mag
}

// checkNaive compares Mul with naive. Both sum the same k+1 terms in
// floating point, each with an error of at most γ_{k+1}·Σ|terms|, γ_j =
// j·u/(1−j·u) ≈ j·2⁻⁵³ (Higham 2002, "Accuracy and Stability of Numerical
// Algorithms", §3.1), so they may differ by twice that; the bound used is
// (k+4)·2⁻⁵² · Σ|terms|, which also covers the rounding of alpha and beta.
func checkNaive(t *testing.T, tA, tB blas.Transpose, alpha float64, a, b blas64.General, beta float64, c blas64.General, k int) {
	t.Helper()
	ref, mag := naive(tA, tB, alpha, a, b, beta, c, k)
	compareNaive(t, tA, tB, alpha, a, b, beta, c, k, ref, mag, make([]float64, BufLen(c.Rows, c.Cols, k)), clone(c))
}

// compareNaive runs Mul into got (a copy of c, with scratch buf) and
// compares it with ref as checkNaive says; padding must not change.
func compareNaive(t *testing.T, tA, tB blas.Transpose, alpha float64, a, b blas64.General, beta float64, c blas64.General, k int, ref, mag, buf []float64, got blas64.General) {
	t.Helper()
	Mul(buf, tA, tB, alpha, a, b, beta, got)
	tol := float64(k+4) * 0x1p-52
	for i := 0; i < c.Rows; i++ {
		for j := 0; j < c.Cols; j++ {
			// The comparison stays plain Go and only the failure goes
			// through require: an assertion call per element (millions in
			// TestNaiveSmall and TestNaiveLarge) made them 4 to 25 times
			// slower. !(d <= bound) also fails on a NaN difference, which
			// InDelta would pass when both are NaN.
			g, r := got.Data[i*got.Stride+j], ref[i*c.Cols+j]
			if d := math.Abs(g - r); !(d <= tol*mag[i*c.Cols+j]) {
				require.FailNowf(t, "Mul differs from naive", "%c%c m=%d n=%d k=%d alpha=%g beta=%g asm=%v: C[%d][%d] = %.17g, naive %.17g",
					tA, tB, c.Rows, c.Cols, k, alpha, beta, Accelerated(), i, j, g, r)
			}
		}
		for j := c.Cols; j < c.Stride && i*c.Stride+j < len(c.Data); j++ {
			if g, w := got.Data[i*got.Stride+j], c.Data[i*c.Stride+j]; math.Float64bits(g) != math.Float64bits(w) {
				require.FailNowf(t, "padding changed", "m=%d n=%d k=%d: padding C[%d][%d] changed from %g to %g", c.Rows, c.Cols, k, i, j, w, g)
			}
		}
	}
}

// TestNaiveSmall: every shape with m, n, k in 1…17, both transposes of
// both operands, beta 0 and 1 (and C full of NaN for beta = 0, which BLAS
// says is not read), against the triple loop, with every kernel.
func TestNaiveSmall(t *testing.T) {
	prev := UsePortable(true)
	defer UsePortable(prev)
	asm := []bool{false}
	if UsePortable(false); Accelerated() {
		asm = append(asm, true)
	}
	rng := rand.New(rand.NewPCG(1, 1))
	buf := make([]float64, BufLen(17, 17, 17))
	got := randGeneral(rng, 17, 17, 0)
	for _, tA := range transposes {
		for _, tB := range transposes {
			for m := 1; m <= 17; m++ {
				for n := 1; n <= 17; n++ {
					for k := 1; k <= 17; k++ {
						a, b := operands(rng, tA, tB, m, n, k, 0)
						c := randGeneral(rng, m, n, 0)
						g := blas64.General{Rows: m, Cols: n, Stride: n, Data: got.Data[:m*n]}
						for _, beta := range []float64{1, 0} {
							if beta == 0 {
								for i := range c.Data {
									c.Data[i] = math.NaN()
								}
							}
							ref, mag := naive(tA, tB, 1, a, b, beta, c, k)
							for _, on := range asm {
								UsePortable(!on)
								copy(g.Data, c.Data)
								compareNaive(t, tA, tB, 1, a, b, beta, c, k, ref, mag, buf, g)
							}
						}
					}
				}
			}
		}
	}
}

// largeShapes are the products nn issues on 256-row chunks of the
// benchmarks' nets (400→256→10, 64→64→10) and shapes that cross every
// block boundary (mc, kc, nc) with remainders.
var largeShapes = [][3]int{ // m, n, k
	{256, 256, 400}, {256, 400, 256}, {256, 10, 256}, {10, 256, 256}, {256, 256, 10},
	{256, 64, 64}, {64, 64, 256}, {256, 10, 64}, {10, 64, 256}, {256, 64, 10},
	{101, 493, 300}, {97, 481, 257}, {5, 1000, 3}, {1000, 5, 7},
}

// TestNaiveLarge: the large shapes, with padded strides and alpha, beta
// other than 0 and 1, against the triple loop, with every kernel.
func TestNaiveLarge(t *testing.T) {
	prev := UsePortable(true)
	defer UsePortable(prev)
	asm := []bool{false}
	if UsePortable(false); Accelerated() {
		asm = append(asm, true)
	}
	rng := rand.New(rand.NewPCG(2, 2))
	for _, s := range largeShapes {
		for _, tA := range transposes {
			for _, tB := range transposes {
				m, n, k := s[0], s[1], s[2]
				a, b := operands(rng, tA, tB, m, n, k, 3)
				c := randGeneral(rng, m, n, 5)
				buf := make([]float64, BufLen(m, n, k))
				for _, ab := range [][2]float64{{1, 0}, {1, 1}, {-0.75, 0.5}} {
					ref, mag := naive(tA, tB, ab[0], a, b, ab[1], c, k)
					for _, on := range asm {
						UsePortable(!on)
						compareNaive(t, tA, tB, ab[0], a, b, ab[1], c, k, ref, mag, buf, clone(c))
					}
				}
			}
		}
	}
}

// TestAgainstGonum: against gonum's pure-Go Dgemm (gonum v0.17.0
// blas/gonum) on random matrices, relative error in the max norm at most
// 1e-13·k (the bound; the rounding bound of TestNaiveSmall is
// about 2.2e-16·k).
func TestAgainstGonum(t *testing.T) {
	kernels(t, func(t *testing.T) {
		rng := rand.New(rand.NewPCG(3, 3))
		shapes := append([][3]int{{1, 1, 1}, {3, 7, 5}, {4, 12, 1}, {33, 65, 129}}, largeShapes...)
		for _, s := range shapes {
			for _, tA := range transposes {
				for _, tB := range transposes {
					m, n, k := s[0], s[1], s[2]
					a, b := operands(rng, tA, tB, m, n, k, 0)
					c := randGeneral(rng, m, n, 0)
					want := clone(c)
					gonum.Implementation{}.Dgemm(tA, tB, m, n, k, 1, a.Data, a.Stride, b.Data, b.Stride, 1, want.Data, want.Stride)
					Mul(make([]float64, BufLen(m, n, k)), tA, tB, 1, a, b, 1, c)
					d, w := 0.0, 0.0
					for i := range c.Data {
						d = math.Max(d, math.Abs(c.Data[i]-want.Data[i]))
						w = math.Max(w, math.Abs(want.Data[i]))
					}
					require.LessOrEqualf(t, d, 1e-13*float64(k)*w, "%c%c %v: max difference %g, max |C| %g", tA, tB, s, d, w)
				}
			}
		}
	})
}

// TestKernelsAgree: the assembly and portable kernels give the same
// products within 1e-12 relative (max norm) on the large shapes; they
// differ at all only because FMA rounds once where the portable kernel
// rounds twice.
func TestKernelsAgree(t *testing.T) {
	prev := UsePortable(false)
	defer UsePortable(prev)
	if !Accelerated() {
		t.Skip("no assembly kernel in this build or on this CPU")
	}
	rng := rand.New(rand.NewPCG(4, 4))
	for _, s := range largeShapes {
		m, n, k := s[0], s[1], s[2]
		a, b := operands(rng, blas.NoTrans, blas.Trans, m, n, k, 0)
		buf := make([]float64, BufLen(m, n, k))
		c1 := randGeneral(rng, m, n, 0)
		c2 := clone(c1)
		Mul(buf, blas.NoTrans, blas.Trans, 1, a, b, 0, c1)
		UsePortable(true)
		Mul(buf, blas.NoTrans, blas.Trans, 1, a, b, 0, c2)
		UsePortable(false)
		d, w := 0.0, 0.0
		for i := range c1.Data {
			d = math.Max(d, math.Abs(c1.Data[i]-c2.Data[i]))
			w = math.Max(w, math.Abs(c2.Data[i]))
		}
		require.LessOrEqualf(t, d, 1e-12*w, "%v: asm and portable differ by %g, max |C| %g", s, d, w)
	}
}

// TestZeroAlloc: Mul allocates nothing given its buffer.
func TestZeroAlloc(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	for _, s := range [][3]int{{256, 256, 400}, {2, 16, 24}, {7, 13, 5}} {
		m, n, k := s[0], s[1], s[2]
		a, b := operands(rng, blas.NoTrans, blas.Trans, m, n, k, 0)
		c := randGeneral(rng, m, n, 0)
		buf := make([]float64, BufLen(m, n, k))
		allocs := testing.AllocsPerRun(5, func() { Mul(buf, blas.NoTrans, blas.Trans, 1, a, b, 0, c) })
		require.Zero(t, allocs, "%v", s)
	}
}

// TestPanics: a dimension mismatch or a short buffer is a programmer
// error and panics.
func TestPanics(t *testing.T) {
	rng := rand.New(rand.NewPCG(6, 6))
	a := randGeneral(rng, 8, 5, 0)
	b := randGeneral(rng, 5, 6, 0)
	c := randGeneral(rng, 8, 6, 0)
	require.Panics(t, func() { Mul(make([]float64, 1000), blas.NoTrans, blas.Trans, 1, a, b, 0, c) })
	require.Panics(t, func() { Mul(nil, blas.NoTrans, blas.NoTrans, 1, a, b, 0, c) })
	require.NotPanics(t, func() { Mul(make([]float64, BufLen(8, 6, 5)), blas.NoTrans, blas.NoTrans, 1, a, b, 0, c) })
}

// FuzzMul: any shape (each dimension 0…40), strides padded by 0…7,
// transposes, alpha and beta, against the triple loop.
func FuzzMul(f *testing.F) {
	f.Add(uint8(5), uint8(13), uint8(17), uint8(0), uint8(3), uint8(1), false, true, 1.0, 0.0)
	f.Add(uint8(40), uint8(1), uint8(0), uint8(7), uint8(0), uint8(2), true, false, -2.0, 0.5)
	f.Add(uint8(4), uint8(12), uint8(4), uint8(0), uint8(0), uint8(0), true, true, 1.0, 1.0)
	f.Fuzz(func(t *testing.T, m, n, k, padA, padB, padC uint8, ta, tb bool, alpha, beta float64) {
		if math.IsNaN(alpha) || math.IsInf(alpha, 0) || math.Abs(alpha) > 1e6 ||
			math.IsNaN(beta) || math.IsInf(beta, 0) || math.Abs(beta) > 1e6 {
			t.Skip()
		}
		M, N, K := int(m%41), int(n%41), int(k%41)
		tA, tB := blas.NoTrans, blas.NoTrans
		if ta {
			tA = blas.Trans
		}
		if tb {
			tB = blas.Trans
		}
		rng := rand.New(rand.NewPCG(uint64(M*1681+N*41+K), 7))
		aPad, bPad := int(padA%8), int(padB%8)
		a, b := operands(rng, tA, tB, M, N, K, 0)
		a = pad(a, aPad)
		b = pad(b, bPad)
		c := randGeneral(rng, M, N, int(padC%8))
		for _, useAsm := range []bool{false, true} {
			prev := UsePortable(!useAsm)
			t.Run(fmt.Sprint("asm=", useAsm), func(t *testing.T) {
				checkNaive(t, tA, tB, alpha, a, b, beta, c, K)
			})
			UsePortable(prev)
		}
	})
}

// pad returns g with its stride grown by p (padding NaN).
func pad(g blas64.General, p int) blas64.General {
	s := g.Cols + p
	d := make([]float64, max(g.Rows*s, 1))
	for i := range d {
		d[i] = math.NaN()
	}
	for i := 0; i < g.Rows; i++ {
		copy(d[i*s:i*s+g.Cols], g.Data[i*g.Stride:i*g.Stride+g.Cols])
	}
	return blas64.General{Rows: g.Rows, Cols: g.Cols, Stride: s, Data: d}
}

// TestRowsAlone: a row of C has the same bits whether Mul computes it
// alone (m = 1, the unpacked path) or among others (the packed path), with
// either kernel, so a model predicts a row alike singly or in a batch.
func TestRowsAlone(t *testing.T) {
	kernels(t, func(t *testing.T) {
		rng := rand.New(rand.NewPCG(7, 7))
		for _, s := range [][3]int{{9, 70, 4}, {13, 5, 300}, {40, 25, 600}, {5, 3, 17}} {
			for _, tA := range transposes {
				for _, tB := range transposes {
					for _, beta := range []float64{0, 1, 0.5} {
						m, n, k := s[0], s[1], s[2]
						a, b := operands(rng, tA, tB, m, n, k, 0)
						c := randGeneral(rng, m, n, 0)
						all := clone(c)
						Mul(make([]float64, BufLen(m, n, k)), tA, tB, -1.5, a, b, beta, all)
						for i := 0; i < m; i++ {
							var ai blas64.General
							if tA == blas.NoTrans {
								ai = blas64.General{Rows: 1, Cols: k, Stride: k, Data: a.Data[i*k : (i+1)*k]}
							} else {
								ai = blas64.General{Rows: k, Cols: 1, Stride: a.Stride, Data: a.Data[i:]}
							}
							ci := blas64.General{Rows: 1, Cols: n, Stride: n, Data: append([]float64(nil), c.Data[i*n:(i+1)*n]...)}
							Mul(nil, tA, tB, -1.5, ai, b, beta, ci)
							for j := 0; j < n; j++ {
								g, w := ci.Data[j], all.Data[i*n+j]
								require.Equal(t, math.Float64bits(w), math.Float64bits(g), "%c%c %v beta=%g: C[%d][%d] alone %.17g, among %d rows %.17g", tA, tB, s, beta, i, j, g, m, w)
							}
						}
					}
				}
			}
		}
	})
}
