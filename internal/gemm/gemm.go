package gemm

import (
	"math"
	"sync/atomic"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
)

// Block sizes; see the package documentation for why.
const (
	mr = 4   // rows of a micro-tile of C
	nr = 12  // columns of a micro-tile of C
	mc = 96  // rows of op(A) packed at a time (a multiple of mr)
	kc = 256 // terms of the inner dimension per packed block
	nc = 480 // columns of op(B) packed at a time (a multiple of nr)
)

// smallRows is the number of rows of C below which Mul multiplies without
// packing: a product with fewer rows than a micro-tile (a prediction of one
// row, a few rows) would spend more time packing op(B) than multiplying.
const smallRows = mr

// portable forces the portable kernel; see UsePortable.
var portable atomic.Bool

// UsePortable makes Mul use the portable Go kernel even where the assembly
// kernel is available (on = true) or restores the default (on = false),
// and returns the previous setting. It exists for tests that compare the
// two kernels; it affects every caller of the package.
func UsePortable(on bool) (prev bool) { return portable.Swap(on) }

// Accelerated reports whether Mul uses an assembly kernel on this machine
// in this build (false under the purego build tag, off amd64, on CPUs
// without AVX2 and FMA, and after UsePortable(true)).
func Accelerated() bool { return haveAsm && !portable.Load() }

// BufLen returns the length of the buffer Mul needs to compute a product
// whose C is m×n with inner dimension k.
func BufLen(m, n, k int) int {
	if m < smallRows || m == 0 || n == 0 || k == 0 {
		return 0
	}
	kb := blockLen(k, kc, 1)
	mb := min(roundUp(m, mr), mc)
	nb := min(roundUp(n, nr), nc)
	return mr*nr + kb*mb + kb*nb
}

func roundUp(x, q int) int { return (x + q - 1) / q * q }

// blockLen returns the length of the blocks that split x into ⌈x/max⌉
// nearly equal parts, rounded up to a multiple of q: splitting k = 400
// into 200 + 200 rather than 256 + 144 keeps every packed block long.
func blockLen(x, max, q int) int {
	parts := (x + max - 1) / max
	return roundUp((x+parts-1)/parts, q)
}

// Mul computes C = alpha·op(A)·op(B) + beta·C, where op(X) is X or Xᵀ as
// tA and tB say, op(A) is m×k, op(B) is k×n and C is m×n, all row-major
// with their strides. buf is scratch of at least BufLen(m, n, k) elements.
// As in BLAS, C is not read when beta = 0 (NaN in C does not propagate).
//
// The order of every sum depends only on m, n and k: for each element,
// the terms are summed in blocks of consecutive p, each block in order of
// p into a register that is then added to C, blocks in increasing p. So
// the result is the same bits whatever goroutine or core computes it, for
// a given kernel (see Accelerated).
//
// Mul panics if the dimensions do not match or buf is too short.
func Mul(buf []float64, tA, tB blas.Transpose, alpha float64, a, b blas64.General, beta float64, c blas64.General) {
	m, n := c.Rows, c.Cols
	am, ak := a.Rows, a.Cols
	if tA != blas.NoTrans {
		am, ak = ak, am
	}
	bk, bn := b.Rows, b.Cols
	if tB != blas.NoTrans {
		bk, bn = bn, bk
	}
	if am != m || bn != n || ak != bk {
		panic("gemm: dimension mismatch")
	}
	k := ak
	if m == 0 || n == 0 {
		return
	}
	if k == 0 || alpha == 0 {
		scale(beta, c)
		return
	}
	useAsm := haveAsm && !portable.Load()
	if m < smallRows {
		small(useAsm, tA != blas.NoTrans, tB != blas.NoTrans, alpha, a, b, beta, c, k)
		return
	}
	if len(buf) < BufLen(m, n, k) {
		panic("gemm: buffer too short")
	}
	kern, transpose := kernelGo, transposeGo
	if useAsm {
		kern, transpose = kernelAsm, transposeAsm
	}
	if beta != 0 && beta != 1 {
		scale(beta, c)
	}
	kb := blockLen(k, kc, 1)
	mb := min(roundUp(m, mr), mc)
	tile := buf[:mr*nr]
	bufA := buf[mr*nr : mr*nr+kb*mb]
	bufB := buf[mr*nr+kb*mb:]
	for jc := 0; jc < n; jc += nc {
		nn := min(nc, n-jc)
		for pc := 0; pc < k; pc += kb {
			kk := min(kb, k-pc)
			packB(transpose, bufB, tB != blas.NoTrans, b, pc, jc, kk, nn)
			add := pc > 0 || beta != 0
			for ic := 0; ic < m; ic += mc {
				mm := min(mc, m-ic)
				packA(transpose, bufA, tA != blas.NoTrans, alpha, a, ic, pc, mm, kk)
				macro(kern, tile, bufA, bufB, mm, nn, kk, c, ic, jc, add)
			}
		}
	}
}

// macro multiplies the packed mm×kk block of op(A) by the packed kk×nn
// block of op(B) into C[ic:ic+mm, jc:jc+nn], adding to C when add is true
// and storing otherwise. Full micro-tiles go straight to C; edge tiles
// through tile (mr·nr values).
func macro(kern kernelFunc, tile, ap, bp []float64, mm, nn, kk int, c blas64.General, ic, jc int, add bool) {
	for jr := 0; jr < nn; jr += nr {
		nw := min(nr, nn-jr)
		bpan := bp[jr*kk : jr*kk+nr*kk]
		for ir := 0; ir < mm; ir += mr {
			mw := min(mr, mm-ir)
			apan := ap[ir*kk : ir*kk+mr*kk]
			off := (ic+ir)*c.Stride + jc + jr
			if mw == mr && nw == nr {
				kern(kk, apan, bpan, c.Data[off:], c.Stride, add)
				continue
			}
			kern(kk, apan, bpan, tile, nr, false)
			for i := 0; i < mw; i++ {
				row := c.Data[off+i*c.Stride : off+i*c.Stride+nw]
				t := tile[i*nr : i*nr+nw]
				if add {
					for j, v := range t {
						row[j] += v
					}
				} else {
					copy(row, t)
				}
			}
		}
	}
}

// packA copies alpha·op(A)[ic:ic+mm, pc:pc+kk] into dst as ⌈mm/mr⌉
// micro-panels of mr rows, each stored column after column (mr values per
// p, zero beyond row mm).
func packA(transpose transposeFunc, dst []float64, trans bool, alpha float64, a blas64.General, ic, pc, mm, kk int) {
	lda := a.Stride
	for ir := 0; ir < mm; ir += mr {
		mw := min(mr, mm-ir)
		pan := dst[ir*kk : ir*kk+mr*kk]
		if trans {
			// op(A)[i][p] = a[p][i]: mr consecutive values per p.
			for p := 0; p < kk; p++ {
				src := a.Data[(pc+p)*lda+ic+ir:]
				d := pan[p*mr : p*mr+mr : p*mr+mr]
				if mw == mr {
					s := src[:mr:mr]
					d[0], d[1], d[2], d[3] = s[0], s[1], s[2], s[3]
				} else {
					for i := range d {
						d[i] = 0
					}
					copy(d, src[:mw])
				}
			}
		} else {
			if mw == mr {
				transpose(pan, a.Data[(ic+ir)*lda+pc:], lda, kk, mr)
			} else {
				for i := range pan {
					pan[i] = 0
				}
				for i := 0; i < mw; i++ {
					r := a.Data[(ic+ir+i)*lda+pc:][:kk]
					for p, v := range r {
						pan[p*mr+i] = v
					}
				}
			}
		}
		if alpha != 1 {
			for i := range pan {
				pan[i] *= alpha
			}
		}
	}
}

// packB copies op(B)[pc:pc+kk, jc:jc+nn] into dst as ⌈nn/nr⌉ micro-panels
// of nr columns, each stored row after row (nr values per p, zero beyond
// column nn).
func packB(transpose transposeFunc, dst []float64, trans bool, b blas64.General, pc, jc, kk, nn int) {
	ldb := b.Stride
	for jr := 0; jr < nn; jr += nr {
		nw := min(nr, nn-jr)
		pan := dst[jr*kk : jr*kk+nr*kk]
		if !trans {
			// op(B)[p][j] = b[p][j]: nr consecutive values per p.
			for p := 0; p < kk; p++ {
				src := b.Data[(pc+p)*ldb+jc+jr:]
				d := pan[p*nr : p*nr+nr]
				if nw == nr {
					copy(d, src[:nr])
				} else {
					n := copy(d, src[:nw])
					for j := n; j < nr; j++ {
						d[j] = 0
					}
				}
			}
			continue
		}
		// op(B)[p][j] = b[j][p]: column j of the panel is row jc+jr+j of b.
		if nw == nr {
			for j := 0; j < nr; j += 4 {
				transpose(pan[j:], b.Data[(jc+jr+j)*ldb+pc:], ldb, kk, nr)
			}
			continue
		}
		for i := range pan {
			pan[i] = 0
		}
		for j := 0; j < nw; j++ {
			r := b.Data[(jc+jr+j)*ldb+pc:][:kk]
			for p, v := range r {
				pan[p*nr+j] = v
			}
		}
	}
}

// scale sets C = beta·C, and C = 0 when beta = 0 whatever C held.
func scale(beta float64, c blas64.General) {
	if beta == 1 {
		return
	}
	for i := 0; i < c.Rows; i++ {
		row := c.Data[i*c.Stride : i*c.Stride+c.Cols]
		if beta == 0 {
			for j := range row {
				row[j] = 0
			}
			continue
		}
		for j := range row {
			row[j] *= beta
		}
	}
}

// small computes C = alpha·op(A)·op(B) + beta·C without packing, for C with
// fewer than smallRows rows, in the same order and with the same roundings
// as the packed path with the kernel in use (fused multiply-adds when fma),
// so that a row of C has the same bits whether it is computed alone or
// with others: per block of kb terms, t = Σ_p (alpha·a_ip)·b_pj summed in
// order of p from 0, then added to C (stored for the first block when
// beta = 0). Four columns of C at a time keep four independent sums.
func small(fma, tA, tB bool, alpha float64, a, b blas64.General, beta float64, c blas64.General, k int) {
	if beta != 0 && beta != 1 {
		scale(beta, c)
	}
	// op(A)[i][p] = a.Data[i*ai + p*ap]; op(B)[p][j] = b.Data[p*bp + j*bj].
	ai, ap := a.Stride, 1
	if tA {
		ai, ap = 1, a.Stride
	}
	bp, bj := b.Stride, 1
	if tB {
		bp, bj = 1, b.Stride
	}
	n := c.Cols
	kb := blockLen(k, kc, 1)
	for i := 0; i < c.Rows; i++ {
		crow := c.Data[i*c.Stride : i*c.Stride+n]
		for pc := 0; pc < k; pc += kb {
			kk := min(kb, k-pc)
			add := pc > 0 || beta != 0
			j := 0
			if ap == 1 && bp == 1 && alpha == 1 {
				// The forward product of one row, Z = x·Wᵀ: op(A)'s row
				// and op(B)'s columns (rows of B) are contiguous.
				x := a.Data[i*ai+pc : i*ai+pc+kk]
				for ; j+4 <= n; j += 4 {
					t0, t1, t2, t3 := dot4(fma, x, b.Data[j*bj+pc:], bj)
					put4(crow[j:j+4:j+4], add, t0, t1, t2, t3)
				}
				for ; j < n; j++ {
					t := dot1(fma, x, b.Data[j*bj+pc:])
					put1(&crow[j], add, t)
				}
			}
			for ; j+4 <= n; j += 4 {
				var t0, t1, t2, t3 float64
				for p := pc; p < pc+kk; p++ {
					x := a.Data[i*ai+p*ap]
					if alpha != 1 {
						x *= alpha
					}
					o := p*bp + j*bj
					y := b.Data[o : o+3*bj+1]
					if fma {
						t0 = math.FMA(x, y[0], t0)
						t1 = math.FMA(x, y[bj], t1)
						t2 = math.FMA(x, y[2*bj], t2)
						t3 = math.FMA(x, y[3*bj], t3)
					} else {
						t0 += float64(x * y[0])
						t1 += float64(x * y[bj])
						t2 += float64(x * y[2*bj])
						t3 += float64(x * y[3*bj])
					}
				}
				put4(crow[j:j+4:j+4], add, t0, t1, t2, t3)
			}
			for ; j < n; j++ {
				t := 0.0
				for p := pc; p < pc+kk; p++ {
					x := a.Data[i*ai+p*ap]
					if alpha != 1 {
						x *= alpha
					}
					if fma {
						t = math.FMA(x, b.Data[p*bp+j*bj], t)
					} else {
						t += float64(x * b.Data[p*bp+j*bj])
					}
				}
				put1(&crow[j], add, t)
			}
		}
	}
}

// put4 adds t0…t3 to d[0:4] when add, and stores them otherwise.
func put4(d []float64, add bool, t0, t1, t2, t3 float64) {
	d = d[:4:4]
	if add {
		d[0] += t0
		d[1] += t1
		d[2] += t2
		d[3] += t3
		return
	}
	d[0], d[1], d[2], d[3] = t0, t1, t2, t3
}

// put1 is put4 for one element.
func put1(d *float64, add bool, t float64) {
	if add {
		*d += t
		return
	}
	*d = t
}

// dot4 returns the four sums Σ_p x_p·y[r·ld + p], r = 0…3, each from 0 in
// order of p, with fused multiply-adds when fma (as the assembly kernel)
// or with a rounded product (as the portable kernel).
func dot4(fma bool, x, y []float64, ld int) (t0, t1, t2, t3 float64) {
	n := len(x)
	y0 := y[:n:n]
	y1 := y[ld : ld+n : ld+n]
	y2 := y[2*ld : 2*ld+n : 2*ld+n]
	y3 := y[3*ld : 3*ld+n : 3*ld+n]
	if fma {
		for p, v := range x {
			t0 = math.FMA(v, y0[p], t0)
			t1 = math.FMA(v, y1[p], t1)
			t2 = math.FMA(v, y2[p], t2)
			t3 = math.FMA(v, y3[p], t3)
		}
		return
	}
	for p, v := range x {
		t0 += float64(v * y0[p])
		t1 += float64(v * y1[p])
		t2 += float64(v * y2[p])
		t3 += float64(v * y3[p])
	}
	return
}

// dot1 is dot4 for one sum.
func dot1(fma bool, x, y []float64) (t float64) {
	y = y[:len(x):len(x)]
	if fma {
		for p, v := range x {
			t = math.FMA(v, y[p], t)
		}
		return
	}
	for p, v := range x {
		t += float64(v * y[p])
	}
	return
}
