package benchmarks

import (
	"context"
	"fmt"
	"runtime"
	"sync"
	"testing"
	"time"

	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// timedQuad is f(x) = ½Σ d_i x_i² with d_i spread over [1, 10⁴], so no
// method converges within a benchmark, and its Eval costs O(P). It adds
// the time spent in Eval to spent and counts the calls.
type timedQuad struct {
	d     []float64
	spent time.Duration
	calls int
}

var _ optim.Objective = (*timedQuad)(nil)

func (q *timedQuad) Eval(grad, x []float64) float64 {
	t0 := time.Now()
	f := 0.0
	for i, v := range x {
		dv := q.d[i] * v
		f += 0.5 * dv * v
		if grad != nil {
			grad[i] = dv
		}
	}
	q.spent += time.Since(t0)
	q.calls++
	return f
}

var largeEval struct {
	once sync.Once
	t    time.Duration
}

// largeEvalTime returns the time of one cost-and-gradient evaluation of
// the large softmax net with the default options, measured once.
func largeEvalTime(b *testing.B) time.Duration {
	largeEval.once.Do(func() {
		_, o, p := objective(b, sizes[2], spec.Softmax, nn.ObjectiveOptions{})
		g := make([]float64, len(p))
		o.Eval(g, p)
		t0 := time.Now()
		o.Eval(g, p)
		largeEval.t = time.Since(t0)
	})
	return largeEval.t
}

// BenchmarkBookkeeping runs each method for b.N+1 iterations at P = 10⁶ on
// timedQuad and reports, from the end of the first iteration (after the
// workspaces exist) to the end of the last: the time per iteration spent
// outside the objective (bookkeeping-ns/iter), the evaluations and the
// heap allocations per iteration, and share = bookkeeping per iteration /
// one large evaluation (target < 0.05). ns/op also holds Minimize's
// start-up.
func BenchmarkBookkeeping(b *testing.B) {
	const P = 1_000_000
	methods := []struct {
		name string
		new  func() optim.Method
	}{
		{"GD", func() optim.Method { return &optim.GradientDescent{} }},
		{"CG", func() optim.Method { return &optim.ConjugateGradient{} }},
		{"LBFGS", func() optim.Method { return &optim.LBFGS{} }},
		{"Momentum", func() optim.Method { return &optim.Momentum{Rate: 1e-5} }},
		{"Nesterov", func() optim.Method { return &optim.Momentum{Rate: 1e-5, Nesterov: true} }},
		{"Adam", func() optim.Method { return &optim.Adam{Rate: 0.01} }},
	}
	d := make([]float64, P)
	x0 := make([]float64, P)
	for i := range d {
		d[i] = 1 + 1e4*float64(i)/P
		x0[i] = 1
	}
	large := largeEvalTime(b)
	for _, mt := range methods {
		b.Run(fmt.Sprintf("%s/P=%d", mt.name, P), func(b *testing.B) {
			q := &timedQuad{d: d}
			type mark struct {
				wall, spent time.Duration
				calls       int
				mallocs     uint64
			}
			var first, last mark
			var ms runtime.MemStats
			start := time.Now()
			lim := optim.Limits{
				Iterations: b.N + 1,
				GradTol:    1e-300,
				Observer: func(s optim.Step, _ []float64) bool {
					if s.Iter == 1 || s.Iter == b.N+1 {
						runtime.ReadMemStats(&ms)
						mk := mark{time.Since(start), q.spent, q.calls, ms.Mallocs}
						if s.Iter == 1 {
							first = mk
						} else {
							last = mk
						}
					}
					return false
				},
			}
			b.ResetTimer()
			res, err := optim.Minimize(context.Background(), q, x0, mt.new(), lim)
			b.StopTimer()
			if err != nil || res.Iterations != b.N+1 {
				b.Fatalf("%d iterations, status %v, err %v", res.Iterations, res.Status, err)
			}
			n := float64(b.N)
			book := (last.wall - first.wall - (last.spent - first.spent)).Seconds() / n
			b.ReportMetric(book*1e9, "bookkeeping-ns/iter")
			b.ReportMetric(float64(last.calls-first.calls)/n, "evals/iter")
			b.ReportMetric(float64(last.mallocs-first.mallocs)/n, "allocs/iter")
			b.ReportMetric(book/large.Seconds(), "share")
		})
	}
}
