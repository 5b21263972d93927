//go:build !openblas

package nn

// Block sizes of gemm in the pure-Go build. gonum's Dgemm computes a
// product on one goroutine when C spans fewer than 4 of its 64×64 blocks
// and otherwise starts goroutines (allocating on every call). gemm hands it
// blocks of C of at most 64×192, i.e. 3 blocks, so every product runs
// serially, allocates nothing, and sums over the inner dimension in one
// fixed order. The inner dimension is not split: on the chunk products of
// the benchmarks (256 rows, widths 64 to 400) slices of 64 or 128 terms,
// as gonum uses on large products, were 10–40% slower in CPU time.
const (
	tileRows = 64
	tileCols = 192
	tileK    = 1 << 30
)
