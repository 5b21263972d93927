package optim

import (
	"context"
	"testing"
)

// diagQuad is the cheap quadratic f(x) = ½Σ d_i x_i² with d_i spread over
// [1, 1e4], so that no method converges within a benchmark.
type diagQuad struct{ d []float64 }

func newDiagQuad(n int) diagQuad {
	d := make([]float64, n)
	for i := range d {
		d[i] = 1 + 1e4*float64(i)/float64(n)
	}
	return diagQuad{d}
}

func (q diagQuad) Eval(grad, x []float64) float64 {
	var f float64
	for i, v := range x {
		dv := q.d[i] * v
		f += 0.5 * dv * v
		if grad != nil {
			grad[i] = dv
		}
	}
	return f
}

// BenchmarkIteration measures one iteration of each method at n = 10⁶ after
// the workspaces exist: allocs/op must be 0.
func BenchmarkIteration(b *testing.B) {
	const n = 1_000_000
	q := newDiagQuad(n)
	x0 := make([]float64, n)
	for i := range x0 {
		x0[i] = 1
	}
	lim, _ := Limits{GradTol: 1e-300}.check()
	for _, m := range allMethods() {
		b.Run(m.name, func(b *testing.B) {
			meth := m.new()
			switch mm := meth.(type) {
			case *GradientDescent:
				if mm.Step > 0 {
					mm.Step = 1e-4
				}
			case *Momentum:
				mm.Rate = 1e-5
			}
			r := newRunner(context.Background(), q, x0, lim)
			if _, err := meth.init(r); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.ResetTimer()
			start := r.evals
			for b.Loop() {
				if st := meth.iterate(r); st != running {
					b.Fatalf("status %v", st)
				}
				r.iter++
			}
			b.ReportMetric((r.evals-start)/float64(b.N), "evals/op")
		})
	}
}
