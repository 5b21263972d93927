package nn

import "runtime"

// TrainingBytes estimates the bytes that an Objective of n over rows rows
// holds with the options opt, which is what the net itself needs in memory
// while it is trained. With P = NumParams, n_0 … n_L the layer widths, K
// the number of classes, m = rows, W the workers (opt.Workers, or
// GOMAXPROCS when 0, at most the number of chunks ⌈m/Chunk⌉), c = min(Chunk,
// m) the rows of one chunk and b the mini-batch rows (opt.Batch when it is
// in (0, m), else no batch buffers), it counts 8-byte words:
//
//	data        m·n_0 + m·K            x (encoded) and y, which the objective reads in place
//	            + m                    the targets of a binary sigmoid output (one unit)
//	batches     m + b·n_0 + b·n_L      row permutation and the gathered batch rows
//	workspaces  W·(2P + 3·c·Σ_{l≥1} n_l) per worker: two chunk gradients waiting to be summed, and Z, A, Δ of every layer
//	            + W·S                  per worker: the scratch in which the matrix products pack their operands
//	gradient    P                      the sum of the chunk gradients
//
// where S, at most 48 + 256·(96 + 480) words, is the most that a product
// of a chunk needs (internal/gemm.BufLen; 0 under the openblas build tag),
// plus at most 160 bytes per chunk for the chunk descriptors (two
// blas64.General of 48 bytes each, and the lists of the batches). It
// leaves out what the caller holds besides: the data set as read from the
// file (another m·K words and one word per row and input column, which is
// n_0 per row when every input is a number; held beside the encoded copy
// at least while it is encoded, and for the whole run unless
// train.Options.DropRows), holdout rows and their workspace, and the
// optimizer's state. For the optimizer add P words for
// each of the optim.StateVectors(method) vectors that a run of
// optim.Minimize keeps, and P for the starting point the caller holds:
// with the default L-BFGS (Memory 10) 1 + 26 = 27·P words in all.
// Go's allocator and garbage collector can hold up to about twice the live
// bytes at a peak (GOGC=100), which this estimate does not include.
func (n *Net) TrainingBytes(rows int, opt ObjectiveOptions) int64 {
	if rows < 1 {
		rows = 1
	}
	m := int64(rows)
	P := int64(n.np)
	n0 := int64(n.sizes[0])
	nL := int64(n.sizes[len(n.sizes)-1])
	K := int64(len(n.spec.Output.Classes))

	words := m*n0 + m*K
	if nL == 1 && K == 2 {
		words += m
	}
	if b := int64(opt.Batch); b > 0 && b < m {
		words += m + b*n0 + b*nL
	}
	chunk := int64(opt.Chunk)
	if chunk <= 0 {
		chunk = DefaultChunk
	}
	chunks := (m + chunk - 1) / chunk
	workers := int64(opt.Workers)
	if workers <= 0 {
		workers = int64(runtime.GOMAXPROCS(0))
	}
	workers = min(workers, chunks)
	var units int64
	for _, s := range n.sizes[1:] {
		units += int64(s)
	}
	c := min(chunk, m)
	words += workers*(2*P+3*c*units+int64(packLen(n, int(c), true))) + P
	return 8*words + 160*chunks
}
