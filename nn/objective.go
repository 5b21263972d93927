package nn

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// DefaultChunk is the number of rows per evaluation chunk when
// ObjectiveOptions.Chunk is 0.
const DefaultChunk = 256

// shuffleStream is the PCG stream constant of Objective.Shuffle.
const shuffleStream = 0x5e1e_0002

// ObjectiveOptions sets how an Objective splits its rows. The zero value
// evaluates all rows as one batch in chunks of DefaultChunk rows on
// runtime.GOMAXPROCS(0) goroutines.
type ObjectiveOptions struct {
	// Batch is the number of rows per mini-batch for EvalBatch, ≥ 0.
	// 0, or a value ≥ the number of rows, means one batch of all rows.
	Batch int
	// Chunk is the number of rows per evaluation chunk, ≥ 0; 0 means
	// DefaultChunk. Results depend on Chunk (the order of the sums) but
	// never on Workers or the machine.
	Chunk int
	// Workers is the number of goroutines that evaluate chunks, ≥ 0; 0
	// means runtime.GOMAXPROCS(0). Results are bit-identical for any value.
	Workers int
	// ClassWeights are per-class factors w_k > 0 on the cross-entropy, one
	// per class in y's column order; nil weighs every class 1 (see the
	// package documentation for the weighted cost). The penalty is not
	// weighted.
	ClassWeights []float64
}

// chunk is a block of consecutive rows: features x and targets t.
type chunk struct{ x, t blas64.General }

// Objective is the penalised cross-entropy cost of a net on a data set, with
// its gradient by backpropagation, as an optim.Batched (see the package
// documentation for the formulas). It keeps references to the x and y given
// to NewObjective, which must not be modified while it is in use. An
// Objective is not safe for concurrent use.
type Objective struct {
	net   *Net
	m     int
	full  []chunk // chunks over all rows, in row order
	x, t  blas64.General
	batch int // rows per batch; m when there is one batch
	nb    int // number of batches
	perm  []int
	bx    []float64 // gathered batch features, batch × Inputs
	bt    []float64 // gathered batch targets, batch × Outputs
	bFull []chunk   // chunks over bx, bt for a batch of batch rows
	bLast []chunk   // chunks over bx, bt for the last (short) batch
	eng   *engine
}

var _ optim.Batched = (*Objective)(nil)

// NewObjective returns the objective of net n on the rows of x (m ×
// Inputs, already encoded: expanded and scaled) with targets y (m × number of classes, one-hot or
// multi-hot, values in [0, 1]). For a binary sigmoid output (one unit) the
// target of the unit is column 1 of y. Errors wrap ErrShape, ErrNoRows,
// ErrOption, or (inside a *ValueError) ErrNotFinite and ErrTarget.
func NewObjective(n *Net, x, y *mat.Dense, opt ObjectiveOptions) (*Objective, error) {
	if n == nil {
		return nil, fmt.Errorf("%w: nil net", ErrShape)
	}
	if x == nil || y == nil {
		return nil, fmt.Errorf("%w: nil data matrix", ErrShape)
	}
	if opt.Batch < 0 || opt.Chunk < 0 || opt.Workers < 0 {
		return nil, fmt.Errorf("%w: batch %d, chunk %d, workers %d: want ≥ 0", ErrOption, opt.Batch, opt.Chunk, opt.Workers)
	}
	m, c := x.Dims()
	my, cy := y.Dims()
	if m == 0 {
		return nil, ErrNoRows
	}
	classes := len(n.spec.Output.Classes)
	if c != n.Inputs() {
		return nil, fmt.Errorf("%w: x has %d columns, net has %d inputs", ErrShape, c, n.Inputs())
	}
	if my != m || cy != classes {
		return nil, fmt.Errorf("%w: y is %d×%d, want %d×%d (rows × classes)", ErrShape, my, cy, m, classes)
	}
	if err := checkValues("x", x, false); err != nil {
		return nil, err
	}
	if err := checkValues("y", y, true); err != nil {
		return nil, err
	}
	var cw *classWeights
	if opt.ClassWeights != nil {
		if len(opt.ClassWeights) != classes {
			return nil, fmt.Errorf("%w: %d class weights for %d classes", ErrOption, len(opt.ClassWeights), classes)
		}
		for k, v := range opt.ClassWeights {
			if !(v > 0) || math.IsInf(v, 1) {
				return nil, fmt.Errorf("%w: class weight %d is %v, want a finite number > 0", ErrOption, k, v)
			}
		}
		cw = newClassWeights(n, opt.ClassWeights)
	}
	K := n.Outputs()
	o := &Objective{net: n, m: m, x: x.RawMatrix()}
	if K == 1 && classes == 2 && n.spec.Output.Activation == spec.Sigmoid {
		t := make([]float64, m)
		for i := range t {
			t[i] = y.At(i, 1)
		}
		o.t = mat64(t, m, 1)
	} else {
		o.t = y.RawMatrix()
	}
	size := opt.Chunk
	if size == 0 {
		size = DefaultChunk
	}
	o.full = chunks(o.x, o.t, size)

	o.batch, o.nb = m, 1
	if opt.Batch > 0 && opt.Batch < m {
		o.batch = opt.Batch
		o.nb = (m + o.batch - 1) / o.batch
		o.perm = make([]int, m)
		for i := range o.perm {
			o.perm[i] = i
		}
		o.bx = make([]float64, o.batch*c)
		o.bt = make([]float64, o.batch*K)
		o.bFull = chunks(mat64(o.bx, o.batch, c), mat64(o.bt, o.batch, K), size)
		last := m - (o.nb-1)*o.batch
		o.bLast = chunks(mat64(o.bx, last, c), mat64(o.bt, last, K), size)
	}

	workers := opt.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(o.full))
	o.eng = newEngine(n, workers, min(size, m))
	for _, w := range o.eng.works {
		w.cw = cw
	}
	runtime.AddCleanup(o, func(e *engine) { e.stop() }, o.eng)
	return o, nil
}

// Close stops the goroutines that evaluate o's chunks. An Objective must not
// be used after Close; Close may be called more than once. An Objective
// that is never closed stops them when it is garbage-collected, but owners
// should close it when done (train.Train and the diagnostics do), so that
// no goroutine outlives its use.
func (o *Objective) Close() error {
	o.eng.stop()
	return nil
}

// checkValues reports the first non-finite value of a, or with target the
// first value outside [0, 1].
func checkValues(name string, a *mat.Dense, target bool) error {
	r, c := a.Dims()
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			v := a.At(i, j)
			switch {
			case math.IsNaN(v) || math.IsInf(v, 0):
				return &ValueError{Matrix: name, Row: i, Col: j, Value: v, Err: ErrNotFinite}
			case target && (v < 0 || v > 1):
				return &ValueError{Matrix: name, Row: i, Col: j, Value: v, Err: ErrTarget}
			}
		}
	}
	return nil
}

// chunks splits the rows of x and t into consecutive blocks of size rows
// (the last may be shorter).
func chunks(x, t blas64.General, size int) []chunk {
	var cs []chunk
	for lo := 0; lo < x.Rows; lo += size {
		r := min(size, x.Rows-lo)
		cs = append(cs, chunk{x: sub(x, lo, 0, r, x.Cols), t: sub(t, lo, 0, r, t.Cols)})
	}
	return cs
}

// Rows returns m, the number of rows.
func (o *Objective) Rows() int { return o.m }

// Eval returns the full cost J(params) over all m rows, penalty included,
// and writes ∇J into grad when grad is non-nil. It allocates nothing after
// the first call. It panics if params or grad does not have length
// NumParams.
func (o *Objective) Eval(grad, params []float64) float64 {
	o.checkArgs(grad, params)
	loss := o.eng.run(o.full, params, grad != nil)
	return o.finish(grad, params, loss, o.m)
}

// Loss returns the mean cross-entropy over all rows, without the penalty:
// (1/m) Σ_i loss_i.
func (o *Objective) Loss(params []float64) float64 {
	o.checkArgs(nil, params)
	return o.eng.run(o.full, params, false) / float64(o.m)
}

// Batches returns the number of mini-batches, ⌈m/Batch⌉ (1 when Batch is 0
// or ≥ m).
func (o *Objective) Batches() int { return o.nb }

// batchRows returns the first row index in perm and the row count of batch k.
func (o *Objective) batchRows(k int) (lo, rows int) {
	if k < 0 || k >= o.nb {
		panic(fmt.Sprintf("nn: batch %d out of range [0, %d)", k, o.nb))
	}
	lo = k * o.batch
	return lo, min(o.batch, o.m-lo)
}

// Share returns b_k/m, the fraction of the rows in batch k.
func (o *Objective) Share(k int) float64 {
	_, rows := o.batchRows(k)
	return float64(rows) / float64(o.m)
}

// Shuffle deals the rows into batches anew: the row order becomes a random
// permutation determined by seed alone (not by earlier shuffles). Batch k
// holds rows perm[k·Batch : (k+1)·Batch]. With one batch it has no effect.
func (o *Objective) Shuffle(seed uint64) {
	if o.nb == 1 {
		return
	}
	for i := range o.perm {
		o.perm[i] = i
	}
	rng := rand.New(rand.NewPCG(seed, shuffleStream))
	rng.Shuffle(len(o.perm), func(i, j int) { o.perm[i], o.perm[j] = o.perm[j], o.perm[i] })
}

// EvalBatch returns the cost of batch k,
//
//	J_k = (1/b_k) Σ_{i∈B_k} loss_i + P(params),
//
// where P is the full penalty with the full m, and writes ∇J_k into grad
// when grad is non-nil. Then Σ_k Share(k)·J_k = J. With one batch it equals
// Eval. It allocates nothing after the first call and panics if k is out of
// range or a length does not match.
func (o *Objective) EvalBatch(grad, params []float64, k int) float64 {
	o.checkArgs(grad, params)
	lo, rows := o.batchRows(k)
	if o.nb == 1 {
		return o.Eval(grad, params)
	}
	n0, K := o.x.Cols, o.t.Cols
	for i, r := range o.perm[lo : lo+rows] {
		copy(o.bx[i*n0:(i+1)*n0], o.x.Data[r*o.x.Stride:r*o.x.Stride+n0])
		copy(o.bt[i*K:(i+1)*K], o.t.Data[r*o.t.Stride:r*o.t.Stride+K])
	}
	cs := o.bFull
	if rows < o.batch {
		cs = o.bLast
	}
	loss := o.eng.run(cs, params, grad != nil)
	return o.finish(grad, params, loss, rows)
}

func (o *Objective) checkArgs(grad, params []float64) {
	o.net.checkParams(params)
	if grad != nil && len(grad) != len(params) {
		panic(fmt.Sprintf("nn: grad has length %d, params %d", len(grad), len(params)))
	}
}

// finish turns the summed loss and gradient of rows rows into the cost
// (1/rows)·Σ loss_i + P and its gradient.
func (o *Objective) finish(grad, params []float64, loss float64, rows int) float64 {
	inv := 1 / float64(rows)
	if grad != nil {
		for i, g := range o.eng.acc {
			grad[i] = g * inv
		}
	}
	return loss*inv + o.penalty(grad, params)
}

// penalty returns P = λ/(2m)·Σw² + λ₁/m·Σ|w| over the weights (and the
// biases when Penalty.Bias) and adds ∂P/∂w = (λ/m)·w + (λ₁/m)·sign(w) to grad
// when grad is non-nil.
func (o *Objective) penalty(grad, params []float64) float64 {
	pen := o.net.spec.Penalty
	if pen.L2 == 0 && pen.L1 == 0 {
		return 0
	}
	fm := float64(o.m)
	c2, c1 := pen.L2/fm, pen.L1/fm
	sq, ab := 0.0, 0.0
	add := func(lo, hi int) {
		for i, w := range params[lo:hi] {
			sq += w * w
			ab += math.Abs(w)
			if grad != nil {
				g := c2 * w
				if w > 0 {
					g += c1
				} else if w < 0 {
					g -= c1
				}
				grad[lo+i] += g
			}
		}
	}
	n := o.net
	for l := 0; l < n.NumLayers(); l++ {
		add(n.wOff[l], n.bOff[l])
		if pen.Bias {
			add(n.bOff[l], n.bOff[l]+n.sizes[l+1])
		}
	}
	return c2/2*sq + c1*ab
}

// engine evaluates lists of chunks on a bounded pool of goroutines. works[0]
// runs on the caller's goroutine; works[i], i ≥ 1, on a goroutine started at
// the first parallel run and stopped when the Objective is collected. The
// engine holds no reference to its Objective.
//
// A worker takes a free result slot and the next chunk, evaluates the chunk
// into the slot and, if every earlier chunk has been added, adds the chunk's
// loss and gradient into the sums, then any parked chunks that follow it.
// Otherwise it parks the slot and goes on with the next chunk. So the sums
// are formed in chunk order, the same for any number of workers, and no
// worker waits for another unless all slots are taken: there are two per
// worker.
type engine struct {
	net      *Net
	works    []*work
	acc      []float64 // Σ over chunks, in chunk order, of the chunk gradients
	wake     []chan struct{}
	stopOnce sync.Once
	wg       sync.WaitGroup
	started  bool

	// The run in progress, set by run before it wakes the workers. The
	// fields below mu are guarded by it; loss and acc are written only by
	// the worker that adds chunk added.
	cs       []chunk
	params   []float64
	backward bool
	loss     float64 // Σ in chunk order of the chunk losses
	mu       sync.Mutex
	freed    sync.Cond // broadcast when a slot returns to free
	next     int       // index of the next chunk to take
	added    int       // chunks added into loss and acc so far
	free     []*slot
	parked   []*slot // a chunk c evaluated before its turn waits in parked[c % len(parked)]
}

// slot holds the result of one chunk between its evaluation and its turn
// to be added.
type slot struct {
	chunk int
	loss  float64
	grad  []float64
}

func newEngine(n *Net, workers, rows int) *engine {
	e := &engine{net: n, works: make([]*work, workers), acc: make([]float64, n.np)}
	e.freed.L = &e.mu
	for i := range e.works {
		e.works[i] = newWork(n, rows, true)
	}
	e.parked = make([]*slot, 2*workers)
	e.free = make([]*slot, 0, len(e.parked))
	for range e.parked {
		e.free = append(e.free, &slot{grad: make([]float64, n.np)})
	}
	return e
}

func (e *engine) serve(w *work, wake <-chan struct{}) {
	for range wake {
		e.work(w)
		e.wg.Done()
	}
}

func (e *engine) start() {
	e.wake = make([]chan struct{}, len(e.works))
	for i := 1; i < len(e.works); i++ {
		e.wake[i] = make(chan struct{}, 1)
		go e.serve(e.works[i], e.wake[i])
	}
	e.started = true
}

func (e *engine) stop() {
	e.stopOnce.Do(func() {
		if e.started {
			for _, ch := range e.wake[1:] {
				close(ch)
			}
		}
	})
}

// work evaluates chunks on w until none is left. At most len(parked)
// chunks hold a slot at a time, all in [added, next), so parked[c % n] is
// free for each of them.
func (e *engine) work(w *work) {
	e.mu.Lock()
	for {
		for len(e.free) == 0 && e.next < len(e.cs) {
			e.freed.Wait()
		}
		if e.next == len(e.cs) {
			e.mu.Unlock()
			return
		}
		s := e.free[len(e.free)-1]
		e.free = e.free[:len(e.free)-1]
		s.chunk = e.next
		e.next++
		e.mu.Unlock()

		ch := e.cs[s.chunk]
		w.grad = s.grad
		w.eval(e.net, e.params, ch.x, ch.t, e.backward)
		s.loss = w.loss

		e.mu.Lock()
		for s != nil {
			if s.chunk != e.added {
				e.parked[s.chunk%len(e.parked)] = s
				break
			}
			// s is the next chunk in order: no other worker touches the
			// sums until added moves past it.
			e.mu.Unlock()
			e.add(s)
			e.mu.Lock()
			e.added++
			e.free = append(e.free, s)
			e.freed.Broadcast()
			i := e.added % len(e.parked)
			s = e.parked[i]
			e.parked[i] = nil
			if s != nil && s.chunk != e.added {
				panic("nn: engine slot out of order")
			}
		}
	}
}

// add adds the loss and gradient of s into the sums.
func (e *engine) add(s *slot) {
	e.loss += s.loss
	if !e.backward {
		return
	}
	if s.chunk == 0 {
		copy(e.acc, s.grad)
		return
	}
	for j, g := range s.grad {
		e.acc[j] += g
	}
}

// run evaluates the chunks and adds their losses and, when backward, their
// gradients in chunk order, so the sums are the same for any number of
// workers. It returns the summed loss and leaves the summed gradient in
// e.acc when backward.
func (e *engine) run(cs []chunk, params []float64, backward bool) float64 {
	e.cs, e.params, e.backward = cs, params, backward
	e.next, e.added, e.loss = 0, 0, 0
	nw := min(len(e.works), len(cs))
	if nw > 1 {
		if !e.started {
			e.start()
		}
		e.wg.Add(nw - 1)
		for i := 1; i < nw; i++ {
			e.wake[i] <- struct{}{}
		}
	}
	e.work(e.works[0])
	if nw > 1 {
		e.wg.Wait()
	}
	e.cs, e.params = nil, nil
	return e.loss
}
