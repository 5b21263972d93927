//go:build openblas

package nn

// rowAloneExact says whether a row computed alone (ForwardRow) has the same
// bits as in a batch (Forward). OpenBLAS picks other kernels for a single
// row than for a block of rows, so under the openblas tag the two agree to
// rounding only.
const rowAloneExact = false
