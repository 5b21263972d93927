package nn

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/seine-ml/seine/spec"
)

// sinkCost keeps the benchmarked results alive.
var sinkCost float64

type benchSize struct {
	rows, inputs, hidden, classes int
}

var benchSizes = []benchSize{
	{150, 4, 8, 3},     // a small tabular problem
	{1800, 64, 64, 10}, // a small image-like problem
}

func benchObjective(b *testing.B, sz benchSize, opt ObjectiveOptions) (*Net, *Objective, []float64) {
	s := &spec.Network{
		Version: 1,
		Inputs:  sz.inputs,
		Hidden:  []spec.Layer{{Units: sz.hidden, Activation: spec.Sigmoid}},
		Output:  spec.Output{Classes: classNames(sz.classes), Activation: spec.Softmax},
		Penalty: spec.Penalty{L2: 1},
		Init:    spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
	n := mustCompile(b, s)
	rng := rand.New(rand.NewPCG(1, 1))
	x, _ := testData(rng, sz.rows, sz.inputs, outSoftmax, false)
	o, err := NewObjective(n, x, oneHot(rng, sz.rows, sz.classes), opt)
	if err != nil {
		b.Fatal(err)
	}
	return n, o, n.NewParams()
}

// BenchmarkEval measures cost plus gradient over all rows. The gflops
// metric is FLOPs().evaluate per row × rows / time.
func BenchmarkEval(b *testing.B) {
	for _, sz := range benchSizes {
		for _, workers := range []int{1, 0} {
			name := fmt.Sprintf("%dx%d-%d-%d/workers=%d", sz.rows, sz.inputs, sz.hidden, sz.classes, workers)
			b.Run(name, func(b *testing.B) {
				n, o, p := benchObjective(b, sz, ObjectiveOptions{Workers: workers})
				g := make([]float64, len(p))
				_, per := n.FLOPs()
				b.ReportAllocs()
				b.ResetTimer()
				for range b.N {
					sinkCost = o.Eval(g, p)
				}
				b.ReportMetric(per*float64(sz.rows)*float64(b.N)/b.Elapsed().Seconds()/1e9, "GFLOP/s")
			})
		}
	}
}

// BenchmarkForward measures prediction over all rows.
func BenchmarkForward(b *testing.B) {
	for _, sz := range benchSizes {
		b.Run(fmt.Sprintf("%dx%d-%d-%d", sz.rows, sz.inputs, sz.hidden, sz.classes), func(b *testing.B) {
			n, _, p := benchObjective(b, sz, ObjectiveOptions{})
			x, _ := testData(rand.New(rand.NewPCG(2, 2)), sz.rows, sz.inputs, outSoftmax, false)
			ws := n.NewWorkspace(sz.rows)
			per, _ := n.FLOPs()
			b.ReportAllocs()
			b.ResetTimer()
			for range b.N {
				sinkCost = n.Forward(ws, p, x).At(0, 0)
			}
			b.ReportMetric(per*float64(sz.rows)*float64(b.N)/b.Elapsed().Seconds()/1e9, "GFLOP/s")
		})
	}
}
