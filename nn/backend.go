//go:build !openblas

package nn

import "github.com/seine-ml/seine/internal/gemm"

// Backend names the matrix-multiply backend of this build, for version
// reports: seine's own kernels, in AVX2+FMA assembly where the CPU has
// them, else in portable Go ("OpenBLAS (cgo)" under the openblas tag).
func Backend() string {
	if gemm.Accelerated() {
		return "seine kernels, AVX2+FMA assembly"
	}
	return "seine kernels, portable Go"
}
