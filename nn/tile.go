//go:build !openblas

package nn

// Tile sizes of gemm in the pure-Go build. gonum's Dgemm computes a product
// on one goroutine when C spans fewer than 4 of its 64×64 blocks and
// otherwise starts goroutines (allocating on every call). gemm hands it
// tiles of at most 64×192, i.e. 3 blocks, so every product runs serially,
// allocates nothing, and sums over the inner dimension in one fixed order.
const (
	tileRows = 64
	tileCols = 192
)
