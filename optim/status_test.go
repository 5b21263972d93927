package optim

import (
	"context"
	"errors"
	"math"
	"slices"
	"sync/atomic"
	"testing"
	"time"

	"gonum.org/v1/gonum/optimize/functions"
)

func rosen() Objective {
	return mghObjective{functions.ExtendedRosenbrock{}.Func, functions.ExtendedRosenbrock{}.Grad}
}

// counted wraps an objective and counts its calls, to check the accounting.
type counted struct {
	Objective
	calls int
	hook  func(call int)
}

func (c *counted) Eval(grad, x []float64) float64 {
	c.calls++
	if c.hook != nil {
		c.hook(c.calls)
	}
	return c.Objective.Eval(grad, x)
}

func allMethods() []struct {
	name string
	new  func() Method
} {
	return []struct {
		name string
		new  func() Method
	}{
		{"GD", func() Method { return &GradientDescent{} }},
		{"GD-fixed", func() Method { return &GradientDescent{Step: 1e-3} }},
		{"CG", func() Method { return &ConjugateGradient{} }},
		{"LBFGS", func() Method { return &LBFGS{} }},
		{"Momentum", func() Method { return &Momentum{Rate: 1e-4} }},
		{"Nesterov", func() Method { return &Momentum{Rate: 1e-4, Nesterov: true} }},
		{"Adam", func() Method { return &Adam{Rate: 0.01} }},
	}
}

func TestBadInput(t *testing.T) {
	x0 := []float64{-1.2, 1}
	cases := []struct {
		name string
		f    Objective
		x0   []float64
		m    Method
		lim  Limits
		want error
	}{
		{"nil objective", nil, x0, &LBFGS{}, Limits{}, ErrNilObjective},
		{"nil method", rosen(), x0, nil, Limits{}, ErrNilMethod},
		{"typed nil method", rosen(), x0, (*LBFGS)(nil), Limits{}, ErrNilMethod},
		{"empty x0", rosen(), nil, &LBFGS{}, Limits{}, ErrEmptyStart},
		{"NaN in x0", rosen(), []float64{math.NaN(), 1}, &LBFGS{}, Limits{}, ErrNotFiniteStart},
		{"cost NaN at x0", Func(func(g, x []float64) float64 { return math.NaN() }), x0, &LBFGS{}, Limits{}, ErrNotFiniteStart},
		{"gradient Inf at x0", Func(func(g, x []float64) float64 {
			if g != nil {
				g[0] = math.Inf(1)
			}
			return 1
		}), x0, &CG{}, Limits{}, ErrNotFiniteStart},
		{"cost NaN at x0, Adam", Func(func(g, x []float64) float64 { return math.NaN() }), x0, &Adam{}, Limits{}, ErrNotFiniteStart},
		{"negative iterations", rosen(), x0, &LBFGS{}, Limits{Iterations: -1}, ErrBadLimits},
		{"negative evaluations", rosen(), x0, &LBFGS{}, Limits{Evaluations: -1}, ErrBadLimits},
		{"negative GradTol", rosen(), x0, &LBFGS{}, Limits{GradTol: -1}, ErrBadLimits},
		{"NaN CostTol", rosen(), x0, &LBFGS{}, Limits{CostTol: math.NaN()}, ErrBadLimits},
		{"negative time", rosen(), x0, &LBFGS{}, Limits{Time: -time.Second}, ErrBadLimits},
		{"GD negative step", rosen(), x0, &GradientDescent{Step: -1}, Limits{}, ErrBadSetting},
		{"GD decrease 1", rosen(), x0, &GradientDescent{Decrease: 1}, Limits{}, ErrBadSetting},
		{"CG formula", rosen(), x0, &ConjugateGradient{Formula: 9}, Limits{}, ErrBadSetting},
		{"CG restart", rosen(), x0, &ConjugateGradient{Restart: -1}, Limits{}, ErrBadSetting},
		{"CG curvature below decrease", rosen(), x0, &ConjugateGradient{Decrease: 0.5, Curvature: 0.4}, Limits{}, ErrBadSetting},
		{"LBFGS memory", rosen(), x0, &LBFGS{Memory: -1}, Limits{}, ErrBadSetting},
		{"LBFGS curvature 1", rosen(), x0, &LBFGS{Curvature: 1}, Limits{}, ErrBadSetting},
		{"Momentum beta", rosen(), x0, &Momentum{Beta: 1.5}, Limits{}, ErrBadSetting},
		{"Momentum rate", rosen(), x0, &Momentum{Rate: -1}, Limits{}, ErrBadSetting},
		{"Momentum decay", rosen(), x0, &Momentum{Decay: -1}, Limits{}, ErrBadSetting},
		{"Adam beta2", rosen(), x0, &Adam{Beta2: 1}, Limits{}, ErrBadSetting},
		{"Adam epsilon", rosen(), x0, &Adam{Epsilon: -1}, Limits{}, ErrBadSetting},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Minimize(context.Background(), c.f, c.x0, c.m, c.lim)
			if !errors.Is(err, c.want) {
				t.Fatalf("error %v; want %v", err, c.want)
			}
			var fe *FieldError
			if errors.Is(err, ErrBadSetting) || errors.Is(err, ErrBadLimits) {
				if !errors.As(err, &fe) || fe.Field == "" || fe.Want == "" {
					t.Errorf("error %v: want a *FieldError naming field and range", err)
				}
			}
			t.Log(err)
		})
	}
}

// CG is a short name used in the table above.
type CG = ConjugateGradient

func TestStatuses(t *testing.T) {
	x0 := []float64{-1.2, 1}
	t.Run("x0 untouched", func(t *testing.T) {
		for _, m := range allMethods() {
			x := slices.Clone(x0)
			res, err := Minimize(context.Background(), rosen(), x, m.new(), Limits{Iterations: 20})
			if err != nil || !slices.Equal(x, x0) || &res.X[0] == &x[0] {
				t.Errorf("%s: err %v, x0 now %v", m.name, err, x)
			}
		}
	})
	t.Run("observer stop", func(t *testing.T) {
		for _, m := range allMethods() {
			res, err := Minimize(context.Background(), rosen(), x0, m.new(),
				Limits{Observer: func(s Step, _ []float64) bool { return s.Iter == 5 }})
			if err != nil || res.Status != Stopped || res.Iterations != 5 || len(res.Trace) != 5 {
				t.Errorf("%s: %v, %v, %d iterations, %d steps; want Stopped after 5", m.name, err, res.Status, res.Iterations, len(res.Trace))
			}
		}
	})
	t.Run("cancel from observer", func(t *testing.T) {
		for _, m := range allMethods() {
			ctx, cancel := context.WithCancel(context.Background())
			res, err := Minimize(ctx, rosen(), x0, m.new(),
				Limits{Observer: func(s Step, _ []float64) bool {
					if s.Iter == 3 {
						cancel()
					}
					return false
				}})
			cancel()
			if res.Status != Cancelled || !errors.Is(err, context.Canceled) || res.Iterations != 3 {
				t.Errorf("%s: %v, %v after %d iterations; want Cancelled after 3", m.name, res.Status, err, res.Iterations)
			}
			if !finite(res.Cost) || len(res.X) != 2 {
				t.Errorf("%s: best point %v cost %v", m.name, res.X, res.Cost)
			}
		}
	})
	t.Run("cancel from another goroutine", func(t *testing.T) {
		// On its 10th call the objective has another goroutine cancel the
		// context and waits for it; no 11th call may follow. For CG and
		// L-BFGS every call after x0 is inside a line search.
		for _, m := range allMethods() {
			ctx, cancel := context.WithCancel(context.Background())
			c := &counted{Objective: rosen(), hook: func(call int) {
				if call == 10 {
					done := make(chan struct{})
					go func() { cancel(); close(done) }()
					<-done
				}
			}}
			res, err := Minimize(ctx, c, x0, m.new(), Limits{})
			cancel()
			if res.Status != Cancelled || !errors.Is(err, context.Canceled) || c.calls != 10 {
				t.Errorf("%s: %v, %v, %d calls; want Cancelled after 10", m.name, res.Status, err, c.calls)
			}
		}
	})
	t.Run("evaluation limit", func(t *testing.T) {
		for _, m := range allMethods() {
			c := &counted{Objective: rosen()}
			res, err := Minimize(context.Background(), c, x0, m.new(), Limits{Evaluations: 25})
			if err != nil || res.Status != EvaluationLimit || res.Evaluations != 25 || c.calls != 25 {
				t.Errorf("%s: %v, %v, %g evaluations, %d calls; want EvaluationLimit at 25", m.name, err, res.Status, res.Evaluations, c.calls)
			}
		}
	})
	t.Run("time limit", func(t *testing.T) {
		slow := Func(func(g, x []float64) float64 {
			time.Sleep(200 * time.Microsecond)
			return rosen().Eval(g, x)
		})
		res, err := Minimize(context.Background(), slow, x0, &GradientDescent{Step: 1e-4}, Limits{Time: 20 * time.Millisecond})
		if err != nil || res.Status != TimeLimit || res.Elapsed < 20*time.Millisecond || res.Elapsed > 2*time.Second {
			t.Errorf("%v, %v after %v; want TimeLimit just after 20ms", err, res.Status, res.Elapsed)
		}
	})
	t.Run("diverged", func(t *testing.T) {
		for _, m := range allMethods() {
			var calls atomic.Int64
			f := Func(func(g, x []float64) float64 {
				if calls.Add(1) > 30 {
					return math.NaN()
				}
				return rosen().Eval(g, x)
			})
			res, err := Minimize(context.Background(), f, x0, m.new(), Limits{})
			if res.Status != Diverged || !errors.Is(err, ErrDiverged) {
				t.Errorf("%s: %v, %v; want Diverged", m.name, res.Status, err)
				continue
			}
			// The best finite point: its true cost is finite and, for the
			// methods that track the lowest cost, equals Result.Cost.
			fx := rosen().Eval(nil, res.X)
			if !finite(fx) || !finite(res.Cost) {
				t.Errorf("%s: best point %v has cost %v", m.name, res.X, fx)
			}
			if m.name != "Momentum" && m.name != "Nesterov" && m.name != "Adam" && fx != res.Cost {
				t.Errorf("%s: cost at X %v, Result.Cost %v", m.name, fx, res.Cost)
			}
		}
	})
	t.Run("iteration limit and grad converged", func(t *testing.T) {
		res, err := Minimize(context.Background(), rosen(), x0, &LBFGS{}, Limits{Iterations: 3})
		if err != nil || res.Status != IterationLimit || res.Iterations != 3 {
			t.Errorf("%v, %v, %d", err, res.Status, res.Iterations)
		}
		res, err = Minimize(context.Background(), rosen(), x0, &LBFGS{}, Limits{})
		if err != nil || res.Status != GradConverged || res.GradNorm > 1e-6*math.Max(1, res.Cost) {
			t.Errorf("%v, %v, ‖g‖ %v", err, res.Status, res.GradNorm)
		}
	})
	t.Run("cost converged", func(t *testing.T) {
		res, err := Minimize(context.Background(), rosen(), x0, &GradientDescent{}, Limits{CostTol: 1e-3, GradTol: 1e-300})
		n := len(res.Trace)
		if err != nil || res.Status != CostConverged || n < 2 ||
			math.Abs(res.Trace[n-2].Cost-res.Trace[n-1].Cost) > 1e-3*math.Max(1, res.Trace[n-1].Cost) {
			t.Errorf("%v, %v", err, res.Status)
		}
	})
}

func TestDeterministic(t *testing.T) {
	for _, m := range allMethods() {
		run := func() Result {
			res, err := Minimize(context.Background(), rosen(), []float64{-1.2, 1}, m.new(), Limits{Iterations: 200})
			if err != nil {
				t.Fatal(err)
			}
			return res
		}
		a, b := run(), run()
		if !slices.Equal(a.X, b.X) || a.Cost != b.Cost || a.Evaluations != b.Evaluations || len(a.Trace) != len(b.Trace) {
			t.Errorf("%s: two runs differ: %v vs %v", m.name, a.X, b.X)
		}
		for i := range a.Trace {
			sa, sb := a.Trace[i], b.Trace[i]
			sa.Elapsed, sb.Elapsed = 0, 0
			if sa != sb {
				t.Errorf("%s: step %d differs: %+v vs %+v", m.name, i, sa, sb)
				break
			}
		}
	}
}

func TestStatusString(t *testing.T) {
	for s, want := range map[Status]string{GradConverged: "GradConverged", Stopped: "Stopped", LineSearchFailed: "LineSearchFailed", Status(99): "Status(99)"} {
		if got := s.String(); got != want {
			t.Errorf("%d: %q, want %q", int(s), got, want)
		}
	}
}

// After the first iteration no method allocates: a run of 100 iterations
// allocates exactly as much as a run of 10 (the trace is pre-sized).
func TestNoAllocsPerIteration(t *testing.T) {
	q, _ := newQuadratic(20, 1e6, 5) // ill-conditioned: no convergence in 100 iterations
	x0 := make([]float64, 20)
	for _, m := range allMethods() {
		meth := m.new()
		// Steps stable for λ_max = 1e6.
		switch mm := meth.(type) {
		case *GradientDescent:
			if mm.Step > 0 {
				mm.Step = 1e-6
			}
		case *Momentum:
			mm.Rate = 1e-7
		}
		allocs := func(iters int) float64 {
			return testing.AllocsPerRun(5, func() {
				res, _ := Minimize(context.Background(), quadNoAlloc{q, make([]float64, 20)}, x0, meth, Limits{Iterations: iters, GradTol: 1e-300})
				if res.Status != IterationLimit {
					t.Fatalf("%s: %v after %d", m.name, res.Status, res.Iterations)
				}
			})
		}
		a10, a100 := allocs(10), allocs(100)
		if a100 != a10 {
			t.Errorf("%s: %v allocations for 10 iterations, %v for 100; want equal", m.name, a10, a100)
		}
	}
}

// quadNoAlloc evaluates the quadratic without allocating.
type quadNoAlloc struct {
	q  *quadratic
	ax []float64
}

func (p quadNoAlloc) Eval(grad, x []float64) float64 {
	n := len(x)
	var f float64
	for i := range n {
		var s float64
		for j := range n {
			s += p.q.a.At(i, j) * x[j]
		}
		p.ax[i] = s
		f += 0.5*x[i]*s - p.q.b[i]*x[i]
		if grad != nil {
			grad[i] = s - p.q.b[i]
		}
	}
	return f
}

// A fixed step far too long makes the cost of ½x² grow fourfold per
// iteration (x ← x − 3x = −2x) while staying finite for hundreds of
// iterations; the Blowup rule calls it diverged once the cost passes 1000
// times the start: 4^k > 1000 at k = 5.
func TestBlowupIsDivergence(t *testing.T) {
	f := Func(func(grad, x []float64) float64 {
		if grad != nil {
			grad[0] = x[0]
		}
		return 0.5 * x[0] * x[0]
	})
	res, err := Minimize(context.Background(), f, []float64{3}, &GradientDescent{Step: 3}, Limits{})
	if !errors.Is(err, ErrDiverged) || res.Status != Diverged {
		t.Fatalf("status %v, err %v; want Diverged", res.Status, err)
	}
	if res.Iterations != 5 || len(res.Trace) != 5 {
		t.Errorf("stopped after %d iterations with %d steps traced, want 5 and 5", res.Iterations, len(res.Trace))
	}
	if res.X[0] != 3 {
		t.Errorf("best point %v, want x0 = 3 (every later cost is higher)", res.X[0])
	}
}
