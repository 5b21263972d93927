package benchmarks

import (
	"math/rand/v2"
	"runtime"
	"strconv"
	"sync"
	"testing"
	"time"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// Package-level sinks keep benchmarked results alive.
var (
	sinkFloat float64
	sinkInt   int
)

// size is a net with one hidden layer and a data set of rows rows.
type size struct {
	name                          string
	rows, inputs, hidden, classes int
}

var sizes = []size{
	{"tiny", 150, 4, 8, 3},
	{"small", 1800, 64, 64, 10},
	{"large", 20000, 400, 256, 10},
}

func (s size) String() string {
	return s.name + "-" + strconv.Itoa(s.rows) + "x" + strconv.Itoa(s.inputs) + "-" +
		strconv.Itoa(s.hidden) + "-" + strconv.Itoa(s.classes)
}

func classNames(k int) []string {
	c := make([]string, k)
	for i := range c {
		c[i] = strconv.Itoa(i)
	}
	return c
}

// netSpec returns the spec of sz with a sigmoid hidden layer and the given
// output activation (a sigmoid output is multi-label).
func netSpec(sz size, out spec.Activation) *spec.Network {
	return &spec.Network{
		Version: 1,
		Inputs:  sz.inputs,
		Hidden:  []spec.Layer{{Units: sz.hidden, Activation: spec.Sigmoid}},
		Output: spec.Output{
			Classes:    classNames(sz.classes),
			Activation: out,
			Multilabel: out == spec.Sigmoid,
		},
		Penalty: spec.Penalty{L2: 1},
		Init:    spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
}

// synthetic returns m rows of standard normal features and targets drawn
// with a fixed seed: one class per row for softmax, each class with
// probability ½ for a multi-label sigmoid output.
func synthetic(m, inputs, classes int, out spec.Activation) (x, y *mat.Dense) {
	rng := rand.New(rand.NewPCG(1, 2))
	xd := make([]float64, m*inputs)
	for i := range xd {
		xd[i] = rng.NormFloat64()
	}
	yd := make([]float64, m*classes)
	for i := 0; i < m; i++ {
		if out == spec.Softmax {
			yd[i*classes+rng.IntN(classes)] = 1
			continue
		}
		for k := 0; k < classes; k++ {
			if rng.IntN(2) == 1 {
				yd[i*classes+k] = 1
			}
		}
	}
	return mat.NewDense(m, inputs, xd), mat.NewDense(m, classes, yd)
}

// objective compiles sz's net and builds its objective on synthetic rows.
func objective(b *testing.B, sz size, out spec.Activation, opt nn.ObjectiveOptions) (*nn.Net, *nn.Objective, []float64) {
	b.Helper()
	n, err := nn.Compile(netSpec(sz, out))
	if err != nil {
		b.Fatal(err)
	}
	x, y := synthetic(sz.rows, sz.inputs, sz.classes, out)
	o, err := nn.NewObjective(n, x, y, opt)
	if err != nil {
		b.Fatal(err)
	}
	return n, o, n.NewParams()
}

// gemmFLOPs is F of the package documentation for widths w over m rows.
func gemmFLOPs(w []int, m int) float64 {
	f := 0.0
	for l := 0; l+1 < len(w); l++ {
		p := float64(w[l]) * float64(w[l+1])
		f += 2 * p
		if l >= 1 {
			f += p
		}
	}
	return 2 * float64(m) * f
}

// product is one call C = op(A)·op(B), with its packing scratch buf
// (see run and bufLen, per build).
type product struct {
	tA, tB blas.Transpose
	a, b   blas64.General
	c      blas64.General
	buf    []float64
}

// withBuf returns p with scratch of its own.
func (p product) withBuf() product {
	k := p.a.Cols
	if p.tA != blas.NoTrans {
		k = p.a.Rows
	}
	p.buf = make([]float64, bufLen(p.c.Rows, p.c.Cols, k))
	return p
}

func general(r, c int, rng *rand.Rand) blas64.General {
	d := make([]float64, r*c)
	for i := range d {
		d[i] = rng.Float64() - 0.5
	}
	return blas64.General{Rows: r, Cols: c, Stride: c, Data: d}
}

// products returns the matrix products of one evaluation of a net with
// widths w on m rows, at full size, in the order the evaluation does them:
// Z_{l+1} = A_l·W_lᵀ for l = 0 … L−1, then for l = L−1 … 0
// ∂W_l = Δ_{l+1}ᵀ·A_l and, for l ≥ 1, Δ_l = Δ_{l+1}·W_l.
func products(w []int, m int) []product {
	rng := rand.New(rand.NewPCG(3, 4))
	L := len(w) - 1
	a := make([]blas64.General, L+1) // A_0 … A_L (A_L holds Z_L)
	d := make([]blas64.General, L+1) // Δ_1 … Δ_L
	wt := make([]blas64.General, L)
	g := make([]blas64.General, L)
	for l := 0; l <= L; l++ {
		a[l] = general(m, w[l], rng)
		if l >= 1 {
			d[l] = general(m, w[l], rng)
		}
	}
	for l := 0; l < L; l++ {
		wt[l] = general(w[l+1], w[l], rng)
		g[l] = general(w[l+1], w[l], rng)
	}
	var ps []product
	for l := 0; l < L; l++ {
		ps = append(ps, product{blas.NoTrans, blas.Trans, a[l], wt[l], a[l+1], nil}.withBuf())
	}
	for l := L - 1; l >= 0; l-- {
		ps = append(ps, product{blas.Trans, blas.NoTrans, d[l+1], a[l], g[l], nil}.withBuf())
		if l >= 1 {
			ps = append(ps, product{blas.NoTrans, blas.NoTrans, d[l+1], wt[l], d[l], nil}.withBuf())
		}
	}
	return ps
}

// split returns p as k products over disjoint blocks of C: blocks of rows
// when C has at least as many rows as columns, else blocks of columns.
func (p product) split(k int) []product {
	byRows := p.c.Rows >= p.c.Cols
	n := p.c.Cols
	if byRows {
		n = p.c.Rows
	}
	var out []product
	for i := 0; i < k; i++ {
		lo, hi := i*n/k, (i+1)*n/k
		if lo == hi {
			continue
		}
		q := p
		if byRows {
			q.c = rowBlock(p.c, lo, hi)
			if p.tA == blas.NoTrans {
				q.a = rowBlock(p.a, lo, hi)
			} else {
				q.a = colBlock(p.a, lo, hi)
			}
		} else {
			q.c = colBlock(p.c, lo, hi)
			if p.tB == blas.NoTrans {
				q.b = colBlock(p.b, lo, hi)
			} else {
				q.b = rowBlock(p.b, lo, hi)
			}
		}
		out = append(out, q.withBuf())
	}
	return out
}

func rowBlock(g blas64.General, lo, hi int) blas64.General {
	return blas64.General{Rows: hi - lo, Cols: g.Cols, Stride: g.Stride, Data: g.Data[lo*g.Stride : (hi-1)*g.Stride+g.Cols]}
}

func colBlock(g blas64.General, lo, hi int) blas64.General {
	return blas64.General{Rows: g.Rows, Cols: hi - lo, Stride: g.Stride, Data: g.Data[lo : (g.Rows-1)*g.Stride+hi]}
}

// ceiling holds the products of one evaluation, whole and split.
type ceiling struct {
	whole []product
	parts [][]product
	procs int
}

func newCeiling(w []int, m, procs int) *ceiling {
	c := &ceiling{whole: products(w, m), procs: procs}
	for _, p := range c.whole {
		c.parts = append(c.parts, p.split(procs))
	}
	return c
}

// runWhole does each product in one BLAS call.
func (c *ceiling) runWhole() {
	for _, p := range c.whole {
		p.run()
	}
}

// runSplit does each product as procs concurrent calls on row or column
// blocks.
func (c *ceiling) runSplit() {
	var wg sync.WaitGroup
	for _, ps := range c.parts {
		for _, p := range ps[1:] {
			wg.Go(p.run)
		}
		ps[0].run()
		wg.Wait()
	}
}

// cost is the wall and CPU time of one evaluation's worth of products.
type cost struct{ wall, cpu time.Duration }

// time returns the best of reps runs of runWhole and of runSplit, the wall
// and the CPU time each taken as its own minimum.
func (c *ceiling) time(reps int) cost {
	best := cost{1<<63 - 1, 1<<63 - 1}
	for _, f := range []func(){c.runWhole, c.runSplit} {
		for range max(reps, 1) {
			c0, t0 := cpuTime(), time.Now()
			f()
			best.wall = min(best.wall, time.Since(t0))
			best.cpu = min(best.cpu, cpuTime()-c0)
		}
	}
	return best
}

var ceilings sync.Map // key: ceilingKey; value: cost

type ceilingKey struct {
	w0, w1, w2, m, procs int
}

// ceilingTime returns c.time(reps) for a net with one hidden layer,
// widths w, on m rows, measured once per process and GOMAXPROCS (both
// outputs of a size share it: the products have the same shapes).
func ceilingTime(w []int, m, reps int) cost {
	procs := runtime.GOMAXPROCS(0)
	k := ceilingKey{w[0], w[1], w[2], m, procs}
	if t, ok := ceilings.Load(k); ok {
		return t.(cost)
	}
	t := newCeiling(w, m, procs).time(reps)
	ceilings.Store(k, t)
	return t
}
