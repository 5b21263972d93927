//go:build !openblas

package nn

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"

	"github.com/seine-ml/seine/internal/gemm"
)

// product computes C = alpha·op(A)·op(B) + beta·C with internal/gemm, our
// own packed GEMM: an AVX2+FMA kernel in Go assembly on amd64 CPUs that
// have both, a portable Go kernel elsewhere and under the purego build
// tag. It runs on the calling goroutine, allocates nothing (buf is the
// worker's packing scratch, of productBufLen elements) and sums in an order
// fixed by the shapes. The kernels round differently (FMA rounds a·b + s
// once), so the last bits of results differ between CPUs with and without
// AVX2+FMA and the purego build, as they differ from the openblas build.
func product(buf []float64, tA, tB blas.Transpose, alpha float64, a, b blas64.General, beta float64, c blas64.General) {
	gemm.Mul(buf, tA, tB, alpha, a, b, beta, c)
}

// productBufLen returns the scratch product needs for C of m×n and inner
// dimension k.
func productBufLen(m, n, k int) int { return gemm.BufLen(m, n, k) }
