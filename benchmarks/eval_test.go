package benchmarks

import (
	"flag"
	"fmt"
	"runtime"
	"testing"
	"time"

	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

var outputs = []spec.Activation{spec.Sigmoid, spec.Softmax}

// reportEval reports the evaluation's GFLOP/s (F of the package
// documentation over the wall time per evaluation), rows/s, and the CPU
// time per evaluation cpu-ms/op since cpu0 (all threads of the process).
func reportEval(b *testing.B, n *nn.Net, rows int, cpu0 time.Duration) (wall, cpu time.Duration) {
	wall = b.Elapsed() / time.Duration(b.N)
	cpu = (cpuTime() - cpu0) / time.Duration(b.N)
	b.ReportMetric(gemmFLOPs(n.Sizes(), rows)/wall.Seconds()/1e9, "GFLOP/s")
	b.ReportMetric(float64(rows)/wall.Seconds(), "rows/s")
	b.ReportMetric(cpu.Seconds()*1e3, "cpu-ms/op")
	return wall, cpu
}

// BenchmarkEval times cost and gradient over all rows with the default
// options (chunk nn.DefaultChunk, GOMAXPROCS workers), then the GEMM
// ceiling on the same shapes (once per size; see ceilingTime), and reports
// ratio = ceiling wall time / evaluation wall time, the share of the
// ceiling's rate the evaluation reaches, and cpu-ratio, the same with CPU
// times (steadier on a loaded machine). Run it with -cpu 1,2 for the
// two-core speed-up.
func BenchmarkEval(b *testing.B) {
	b.Logf("products: %s, GOMAXPROCS %d", backend(), runtime.GOMAXPROCS(0))
	for _, sz := range sizes {
		for _, out := range outputs {
			b.Run(fmt.Sprintf("%v/%v", sz, out), func(b *testing.B) {
				n, o, p := objective(b, sz, out, nn.ObjectiveOptions{})
				g := make([]float64, len(p))
				sinkFloat = o.Eval(g, p) // warm-up: workspaces and workers
				b.ReportAllocs()
				b.ResetTimer()
				cpu0 := cpuTime()
				for range b.N {
					sinkFloat = o.Eval(g, p)
				}
				b.StopTimer()
				wall, cpu := reportEval(b, n, sz.rows, cpu0)
				c := ceilingTime(n.Sizes(), sz.rows, min(b.N, 5))
				b.ReportMetric(gemmFLOPs(n.Sizes(), sz.rows)/c.wall.Seconds()/1e9, "gemm-GFLOP/s")
				b.ReportMetric(c.wall.Seconds()/wall.Seconds(), "ratio")
				if cpu > 0 {
					b.ReportMetric(c.cpu.Seconds()/cpu.Seconds(), "cpu-ratio")
				}
			})
		}
	}
}

// BenchmarkGEMM times the ceiling alone: the products of one evaluation at
// full size, each in one BLAS call ("whole") or as GOMAXPROCS concurrent
// calls on blocks ("split").
func BenchmarkGEMM(b *testing.B) {
	for _, sz := range sizes {
		w := []int{sz.inputs, sz.hidden, sz.classes}
		for _, mode := range []string{"whole", "split"} {
			b.Run(fmt.Sprintf("%v/%s", sz, mode), func(b *testing.B) {
				c := newCeiling(w, sz.rows, runtime.GOMAXPROCS(0))
				run := c.runWhole
				if mode == "split" {
					run = c.runSplit
				}
				run()
				b.ReportAllocs()
				b.ResetTimer()
				for range b.N {
					run()
				}
				per := b.Elapsed() / time.Duration(b.N)
				b.ReportMetric(gemmFLOPs(w, sz.rows)/per.Seconds()/1e9, "GFLOP/s")
			})
		}
	}
}

// BenchmarkGEMMChunk times the products of one evaluation of a chunk of
// nn.DefaultChunk rows, on one goroutine, as each worker of an evaluation
// does them: the single-core rate of the kernel on nn's own shapes (run
// it with -cpu 1 for the single-core figure).
func BenchmarkGEMMChunk(b *testing.B) {
	b.Logf("products: %s", backend())
	for _, sz := range sizes {
		w := []int{sz.inputs, sz.hidden, sz.classes}
		rows := min(sz.rows, nn.DefaultChunk)
		b.Run(fmt.Sprintf("%v/chunk=%d", sz, rows), func(b *testing.B) {
			ps := products(w, rows)
			for _, p := range ps {
				p.run()
			}
			b.ReportAllocs()
			b.ResetTimer()
			for range b.N {
				for _, p := range ps {
					p.run()
				}
			}
			per := b.Elapsed() / time.Duration(b.N)
			b.ReportMetric(gemmFLOPs(w, rows)/per.Seconds()/1e9, "GFLOP/s")
		})
	}
}

// grid adds the large size to BenchmarkEvalGrid (20 large evaluations
// even at -benchtime=1x, too many for CI): go test ./benchmarks -run '^$'
// -bench EvalGrid -grid.
var grid = flag.Bool("grid", false, "include the large size in BenchmarkEvalGrid")

// BenchmarkEvalGrid times the softmax evaluation at each size for every
// combination of workers and chunk rows, to choose nn.DefaultChunk. The
// large size runs only with -grid.
func BenchmarkEvalGrid(b *testing.B) {
	for _, sz := range sizes {
		if sz.name == "large" && !*grid {
			continue
		}
		for _, workers := range []int{1, 2} {
			for _, chunk := range []int{64, 128, 256, 512, 1024} {
				b.Run(fmt.Sprintf("%v/workers=%d/chunk=%d", sz, workers, chunk), func(b *testing.B) {
					n, o, p := objective(b, sz, spec.Softmax, nn.ObjectiveOptions{Workers: workers, Chunk: chunk})
					g := make([]float64, len(p))
					sinkFloat = o.Eval(g, p)
					b.ReportAllocs()
					b.ResetTimer()
					cpu0 := cpuTime()
					for range b.N {
						sinkFloat = o.Eval(g, p)
					}
					b.StopTimer()
					reportEval(b, n, sz.rows, cpu0)
				})
			}
		}
	}
}

// BenchmarkEvalRows times the small softmax net at growing m; the slope of
// log(ns/op) against log m should be 1.
func BenchmarkEvalRows(b *testing.B) {
	for _, m := range []int{1000, 3000, 10000, 30000, 100000} {
		sz := size{"small", m, 64, 64, 10}
		b.Run(fmt.Sprintf("m=%d", m), func(b *testing.B) {
			n, o, p := objective(b, sz, spec.Softmax, nn.ObjectiveOptions{})
			g := make([]float64, len(p))
			sinkFloat = o.Eval(g, p)
			b.ReportAllocs()
			b.ResetTimer()
			cpu0 := cpuTime()
			for range b.N {
				sinkFloat = o.Eval(g, p)
			}
			b.StopTimer()
			reportEval(b, n, m, cpu0)
		})
	}
}
