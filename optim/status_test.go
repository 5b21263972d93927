package optim

import (
	"context"
	"errors"
	"math"
	"slices"
	"sync/atomic"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
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
			require.ErrorIs(t, err, c.want)
			if errors.Is(err, ErrBadSetting) || errors.Is(err, ErrBadLimits) {
				var fe *FieldError
				if assert.ErrorAs(t, err, &fe, "want a *FieldError naming field and range") {
					assert.NotEmpty(t, fe.Field, "FieldError.Field")
					assert.NotEmpty(t, fe.Want, "FieldError.Want")
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
			t.Run(m.name, func(t *testing.T) {
				x := slices.Clone(x0)
				res, err := Minimize(context.Background(), rosen(), x, m.new(), Limits{Iterations: 20})
				require.NoError(t, err)
				assert.Equal(t, x0, x, "x0 after the run")
				assert.NotSame(t, &x[0], &res.X[0], "Result.X must be a new slice")
			})
		}
	})
	t.Run("observer stop", func(t *testing.T) {
		for _, m := range allMethods() {
			t.Run(m.name, func(t *testing.T) {
				res, err := Minimize(context.Background(), rosen(), x0, m.new(),
					Limits{Observer: func(s Step, _ []float64) bool { return s.Iter == 5 }})
				require.NoError(t, err)
				assert.Equal(t, Stopped, res.Status)
				assert.Equal(t, 5, res.Iterations)
				assert.Len(t, res.Trace, 5)
			})
		}
	})
	t.Run("cancel from observer", func(t *testing.T) {
		for _, m := range allMethods() {
			t.Run(m.name, func(t *testing.T) {
				ctx, cancel := context.WithCancel(context.Background())
				defer cancel()
				res, err := Minimize(ctx, rosen(), x0, m.new(),
					Limits{Observer: func(s Step, _ []float64) bool {
						if s.Iter == 3 {
							cancel()
						}
						return false
					}})
				assert.ErrorIs(t, err, context.Canceled)
				assert.Equal(t, Cancelled, res.Status)
				assert.Equal(t, 3, res.Iterations)
				assert.True(t, finite(res.Cost), "best cost %v", res.Cost)
				assert.Len(t, res.X, 2)
			})
		}
	})
	t.Run("cancel from another goroutine", func(t *testing.T) {
		// On its 10th call the objective has another goroutine cancel the
		// context and waits for it; no 11th call may follow. For CG and
		// L-BFGS every call after x0 is inside a line search.
		for _, m := range allMethods() {
			t.Run(m.name, func(t *testing.T) {
				ctx, cancel := context.WithCancel(context.Background())
				defer cancel()
				c := &counted{Objective: rosen(), hook: func(call int) {
					if call == 10 {
						done := make(chan struct{})
						go func() { cancel(); close(done) }()
						<-done
					}
				}}
				res, err := Minimize(ctx, c, x0, m.new(), Limits{})
				assert.ErrorIs(t, err, context.Canceled)
				assert.Equal(t, Cancelled, res.Status)
				assert.Equal(t, 10, c.calls, "calls of the objective")
			})
		}
	})
	t.Run("evaluation limit", func(t *testing.T) {
		for _, m := range allMethods() {
			t.Run(m.name, func(t *testing.T) {
				c := &counted{Objective: rosen()}
				res, err := Minimize(context.Background(), c, x0, m.new(), Limits{Evaluations: 25})
				require.NoError(t, err)
				assert.Equal(t, EvaluationLimit, res.Status)
				assert.Equal(t, 25.0, res.Evaluations)
				assert.Equal(t, 25, c.calls, "calls of the objective")
			})
		}
	})
	t.Run("time limit", func(t *testing.T) {
		slow := Func(func(g, x []float64) float64 {
			time.Sleep(200 * time.Microsecond)
			return rosen().Eval(g, x)
		})
		res, err := Minimize(context.Background(), slow, x0, &GradientDescent{Step: 1e-4}, Limits{Time: 20 * time.Millisecond})
		require.NoError(t, err)
		assert.Equal(t, TimeLimit, res.Status)
		// Just after 20ms: the limit is checked before every evaluation of
		// 0.2ms; 2s leaves room for a loaded machine.
		assert.GreaterOrEqual(t, res.Elapsed, 20*time.Millisecond)
		assert.LessOrEqual(t, res.Elapsed, 2*time.Second)
	})
	t.Run("diverged", func(t *testing.T) {
		for _, m := range allMethods() {
			t.Run(m.name, func(t *testing.T) {
				var calls atomic.Int64
				f := Func(func(g, x []float64) float64 {
					if calls.Add(1) > 30 {
						return math.NaN()
					}
					return rosen().Eval(g, x)
				})
				res, err := Minimize(context.Background(), f, x0, m.new(), Limits{})
				require.ErrorIs(t, err, ErrDiverged)
				require.Equal(t, Diverged, res.Status)
				// The best finite point: its true cost is finite and, for the
				// methods that track the lowest cost, equals Result.Cost.
				fx := rosen().Eval(nil, res.X)
				assert.True(t, finite(fx), "cost at the best point %v", fx)
				assert.True(t, finite(res.Cost), "Result.Cost %v", res.Cost)
				if m.name != "Momentum" && m.name != "Nesterov" && m.name != "Adam" {
					assert.Equal(t, fx, res.Cost, "cost at X against Result.Cost")
				}
			})
		}
	})
	t.Run("iteration limit and grad converged", func(t *testing.T) {
		res, err := Minimize(context.Background(), rosen(), x0, &LBFGS{}, Limits{Iterations: 3})
		require.NoError(t, err)
		assert.Equal(t, IterationLimit, res.Status)
		assert.Equal(t, 3, res.Iterations)
		res, err = Minimize(context.Background(), rosen(), x0, &LBFGS{}, Limits{})
		require.NoError(t, err)
		assert.Equal(t, GradConverged, res.Status)
		assert.LessOrEqual(t, res.GradNorm, 1e-6*math.Max(1, res.Cost))
	})
	t.Run("cost converged", func(t *testing.T) {
		res, err := Minimize(context.Background(), rosen(), x0, &GradientDescent{}, Limits{CostTol: 1e-3, GradTol: 1e-300})
		require.NoError(t, err)
		assert.Equal(t, CostConverged, res.Status)
		n := len(res.Trace)
		require.GreaterOrEqual(t, n, 2)
		assert.LessOrEqual(t, math.Abs(res.Trace[n-2].Cost-res.Trace[n-1].Cost), 1e-3*math.Max(1, res.Trace[n-1].Cost))
	})
}

func TestDeterministic(t *testing.T) {
	for _, m := range allMethods() {
		t.Run(m.name, func(t *testing.T) {
			run := func() Result {
				res, err := Minimize(context.Background(), rosen(), []float64{-1.2, 1}, m.new(), Limits{Iterations: 200})
				require.NoError(t, err)
				return res
			}
			a, b := run(), run()
			assert.Equal(t, a.X, b.X, "two runs give different points")
			assert.Equal(t, a.Cost, b.Cost)
			assert.Equal(t, a.Evaluations, b.Evaluations)
			require.Len(t, b.Trace, len(a.Trace))
			for i := range a.Trace {
				sa, sb := a.Trace[i], b.Trace[i]
				sa.Elapsed, sb.Elapsed = 0, 0
				if !assert.Equal(t, sa, sb, "step %d", i) {
					break
				}
			}
		})
	}
}

func TestStatusString(t *testing.T) {
	for _, c := range []struct {
		s    Status
		want string
	}{
		{GradConverged, "GradConverged"},
		{Stopped, "Stopped"},
		{LineSearchFailed, "LineSearchFailed"},
		{Status(99), "Status(99)"},
	} {
		assert.Equal(t, c.want, c.s.String())
	}
}

// After the first iteration no method allocates: a run of 100 iterations
// allocates exactly as much as a run of 10 (the trace is pre-sized).
func TestNoAllocsPerIteration(t *testing.T) {
	q, _ := newQuadratic(20, 1e6, 5) // ill-conditioned: no convergence in 100 iterations
	x0 := make([]float64, 20)
	for _, m := range allMethods() {
		t.Run(m.name, func(t *testing.T) {
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
					// Plain testing here: an assertion inside the measured
					// function must not allocate.
					if res.Status != IterationLimit {
						t.Fatalf("%v after %d iterations", res.Status, res.Iterations)
					}
				})
			}
			a10, a100 := allocs(10), allocs(100)
			assert.Equal(t, a10, a100, "allocations for 10 and for 100 iterations")
		})
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
	require.ErrorIs(t, err, ErrDiverged)
	require.Equal(t, Diverged, res.Status)
	assert.Equal(t, 5, res.Iterations)
	assert.Len(t, res.Trace, 5)
	assert.Equal(t, 3.0, res.X[0], "best point: x0 = 3 (every later cost is higher)")
}
