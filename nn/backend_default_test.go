//go:build !openblas

package nn

// rowAloneExact says whether a row computed alone (ForwardRow) has the same
// bits as in a batch (Forward): true for seine's own kernels, which sum
// every product in an order fixed by the shapes (internal/gemm).
const rowAloneExact = true
