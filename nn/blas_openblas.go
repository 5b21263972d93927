//go:build openblas

package nn

/*
#cgo LDFLAGS: -lopenblas
void openblas_set_num_threads(int);
*/
import "C"

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/netlib/blas/netlib"
)

// With the build tag openblas, every matrix product of package nn (and of
// any code that calls gonum's blas64) goes to OpenBLAS through
// gonum.org/v1/netlib instead of gonum's pure-Go Dgemm. It needs cgo and
// the OpenBLAS library (Debian and Ubuntu: libopenblas-dev).
//
// OpenBLAS runs on one thread: the evaluation is already data-parallel over
// chunks of rows, and a serial product sums in one fixed order, so results
// stay bit-identical for any Workers or GOMAXPROCS (they differ from the
// pure-Go build in the last bits, within 1e-12 relative).
//
// product hands OpenBLAS each product whole: it neither starts goroutines
// (one thread) nor allocates, and it is fastest on the largest block it is
// given. It packs into its own buffers, so buf is unused.
func product(buf []float64, tA, tB blas.Transpose, alpha float64, a, b blas64.General, beta float64, c blas64.General) {
	blas64.Gemm(tA, tB, alpha, a, b, beta, c)
}

// productBufLen is 0: OpenBLAS needs no scratch from nn.
func productBufLen(m, n, k int) int { return 0 }

// init selects the BLAS backend; it is the only effect of the build tag.
func init() {
	C.openblas_set_num_threads(1)
	blas64.Use(netlib.Implementation{})
}
