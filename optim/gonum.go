package optim

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/optimize"
)

// Gonum runs a method of gonum's optimize package through Minimize, so that
// it meets the same limits and is counted and reported the same way as the
// methods of this package.
//
// Minimize drives the gonum method directly through its task protocol
// (optimize.Method's Init and Run) rather than through optimize.Minimize:
// every evaluation the method asks for goes through the same accounting,
// and the context, evaluation limit and time limit are checked before each.
// Each MajorIteration of the gonum method is one iteration here.
//
// Counting: when the method uses the gradient, every evaluation request,
// whether for the cost, the gradient or both, is served by one call
// f.Eval(grad, x), counted as one evaluation, and the cost and gradient are
// kept; a later request at a bitwise-equal point is answered from them
// without a new evaluation. A method that does not use the gradient (such
// as optimize.NelderMead) gets f.Eval(nil, x), one evaluation each.
//
// Status: gonum's own stopping tests stay active. A gonum method that
// stops by itself maps to GradConverged (optimize.GradientThreshold),
// LineSearchFailed (a failure with an error, e.g. a line-search failure) or
// CostConverged (any other status, such as optimize.MethodConverge).
//
// The zero value runs &optimize.LBFGS{}. Methods needing the Hessian are
// rejected with ErrBadSetting. A gonum method may panic on settings it
// finds invalid; those are not checked here. Unlike the other methods, the
// gonum method allocates during its iterations.
type Gonum struct {
	Method optimize.Method

	m          optimize.Method
	usesGrad   bool
	ops        chan optimize.Task
	results    chan optimize.Task
	pending    optimize.Task // the MajorIteration task to hand back
	hasPending bool
	live       bool // the method's goroutine runs
	cx, cg     []float64
	cf         float64
	cached     bool
	prev       []float64
}

var _ Method = (*Gonum)(nil)

func (m *Gonum) init(r *runner) (Status, error) {
	if m == nil {
		return running, ErrNilMethod
	}
	m.m = m.Method
	if m.m == nil {
		m.m = &optimize.LBFGS{}
	}
	uses, err := m.m.Uses(optimize.Available{Grad: true})
	if err != nil {
		return running, fmt.Errorf("%w: Gonum.Method %T: %v", ErrBadSetting, m.m, err)
	}
	m.usesGrad = uses.Grad
	n := len(r.x)
	m.cx, m.cg, m.prev = grow(m.cx, n), grow(m.cg, n), grow(m.prev, n)
	m.cached, m.hasPending = false, false
	if c := m.m.Init(n, 1); c < 1 {
		return running, fmt.Errorf("%w: Gonum.Method %T: Init returned %d tasks", ErrBadSetting, m.m, c)
	}
	m.ops = make(chan optimize.Task, 1)
	m.results = make(chan optimize.Task, 1)
	loc := &optimize.Location{X: append([]float64(nil), r.x...)}
	tasks := []optimize.Task{{ID: 0, Op: optimize.NoOperation, Location: loc}}
	go m.m.Run(m.ops, m.results, tasks)
	m.live = true
	// Serve requests until the first MajorIteration: the starting point.
	st := m.serve(r)
	if st == running && !m.usesGrad {
		r.gnorm = math.NaN()
	}
	return st, nil
}

func (m *Gonum) iterate(r *runner) Status {
	copy(m.prev, r.x)
	st := m.serve(r)
	if st == running {
		r.stepLen = floats.Distance(r.x, m.prev, 2)
	}
	return st
}

// serve hands back the pending task and answers the method's requests
// until it reports a MajorIteration, which becomes the current point.
func (m *Gonum) serve(r *runner) Status {
	if m.hasPending {
		m.hasPending = false
		m.results <- m.pending
	}
	for {
		task, ok := <-m.ops
		if !ok {
			m.live = false
			return LineSearchFailed
		}
		switch {
		case task.Op == optimize.MajorIteration:
			copy(r.x, task.X)
			r.f = task.F
			if m.usesGrad && len(task.Gradient) == len(r.x) {
				copy(r.g, task.Gradient)
				r.gnorm = floats.Norm(r.g, 2)
			} else {
				r.gnorm = math.NaN()
			}
			m.pending, m.hasPending = task, true
			return running
		case task.Op == optimize.MethodDone:
			m.pending, m.hasPending = task, false
			return m.doneStatus()
		case task.Op == optimize.NoOperation:
			m.results <- task
		case task.Op&^(optimize.FuncEvaluation|optimize.GradEvaluation|optimize.HessEvaluation) == 0:
			if st := m.evaluate(r, task); st != running {
				return st
			}
			m.results <- task
		default:
			panic(fmt.Sprintf("optim: gonum method sent operation %v", task.Op))
		}
	}
}

// evaluate answers one evaluation request of the gonum method.
func (m *Gonum) evaluate(r *runner, task optimize.Task) Status {
	loc := task.Location
	if task.Op&optimize.HessEvaluation != 0 {
		panic("optim: gonum method asked for the Hessian")
	}
	if !m.usesGrad {
		f, st := r.eval(nil, loc.X)
		loc.F = f
		return st
	}
	if !m.cached || !floats.Same(m.cx, loc.X) {
		f, st := r.eval(m.cg, loc.X)
		if st != running {
			return st
		}
		copy(m.cx, loc.X)
		m.cf, m.cached = f, true
	}
	if task.Op&optimize.FuncEvaluation != 0 {
		loc.F = m.cf
	}
	if task.Op&optimize.GradEvaluation != 0 {
		if len(loc.Gradient) != len(m.cg) {
			loc.Gradient = make([]float64, len(m.cg))
		}
		copy(loc.Gradient, m.cg)
	}
	return running
}

func (m *Gonum) doneStatus() Status {
	s, ok := m.m.(optimize.Statuser)
	if !ok {
		return CostConverged
	}
	status, err := s.Status()
	switch {
	case status == optimize.GradientThreshold:
		return GradConverged
	case err != nil || status == optimize.Failure:
		return LineSearchFailed
	}
	return CostConverged
}

// finish stops the gonum method's goroutine: it hands PostIteration to the
// method, closes the results and waits until the method closes its
// operations.
func (m *Gonum) finish(r *runner) {
	if m == nil || !m.live {
		return
	}
	m.hasPending = false
	m.results <- optimize.Task{Op: optimize.PostIteration}
	close(m.results)
	for range m.ops {
	}
	m.live = false
}
