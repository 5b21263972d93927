// Package benchmarks measures seine's speed against the ceiling that bounds
// it. It holds no library code: everything is in its _test.go files, run with
//
//	go test ./benchmarks -run '^$' -bench .
//
// What is measured:
//
//   - BenchmarkEval: one cost-and-gradient evaluation (nn.Objective.Eval)
//     over all m rows of three nets (tiny 150×4→8→3, small 1,800×64→64→10,
//     large 20,000×400→256→10), each with a sigmoid and a softmax output.
//     After the timed loop it times the GEMM ceiling: the same five
//     matrix products at full size, with the build's products (see below), and
//     reports gemm-GFLOP/s and ratio = eval rate / GEMM rate (cpu-ratio:
//     the same with process CPU time, steadier on a shared machine).
//   - BenchmarkGEMM: the ceiling on its own.
//   - BenchmarkGEMMChunk: the products of one evaluation of a single
//     256-row chunk on one goroutine, as each worker does them; with
//     -cpu 1 the single-core rate on nn's own shapes.
//   - BenchmarkEvalGrid: every combination of workers (1, 2) and chunk
//     (64 … 1,024 rows) at each size.
//   - BenchmarkEvalRows: the small net at m = 1,000 … 100,000 rows, for the
//     slope of log time against log m.
//   - BenchmarkPredict, BenchmarkProbabilities, BenchmarkProbabilitiesBatch,
//     BenchmarkReadModel: the triage model as a service uses it.
//   - BenchmarkBookkeeping: one iteration of each optimizer at P = 10⁶
//     minus the time spent in its objective.
//   - TestTrainingBytes: nn.Net.TrainingBytes against the bytes allocated,
//     and no allocation per evaluation after the first.
//
// FLOP counts. A product of an r×k by a k×c matrix counts 2·r·k·c. One
// evaluation of a net with widths n_0 … n_L over m rows counts the GEMM
// work
//
//	F = 2·m·( 2·Σ_l n_l·n_{l+1} + Σ_{l≥1} n_l·n_{l+1} )
//
// (forward Z_{l+1} = A_l·W_lᵀ and ∂W_l = Δ_{l+1}ᵀ·A_l for every layer, and
// Δ_l = Δ_{l+1}·W_l for every layer but the first). Both the evaluation's
// GFLOP/s and the ceiling's use this F, so ratio is the ceiling's time
// over the evaluation's time; the activations, losses and sums the
// evaluation also does are counted as overhead, not as work.
//
// The ceiling multiplies the full m-row matrices as nn does in the build,
// once with each product in one call and once split into GOMAXPROCS row
// blocks on as many goroutines; the faster of the two counts. With the
// default build that is internal/gemm (its AVX2+FMA kernel where the CPU
// has one), with -tags purego internal/gemm's portable Go kernel, and with
// -tags openblas OpenBLAS on one thread (through blas64, which package nn
// points at gonum's netlib binding). Both run single-threaded per call.
package benchmarks
