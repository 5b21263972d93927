//go:build !openblas

package benchmarks

import "github.com/seine-ml/seine/internal/gemm"

// backend names the matrix products in use: internal/gemm with its
// assembly or portable kernel.
func backend() string {
	if gemm.Accelerated() {
		return "internal/gemm, AVX2+FMA kernel"
	}
	return "internal/gemm, portable Go kernel"
}

// run computes C = op(A)·op(B) as nn does in this build.
func (p product) run() { gemm.Mul(p.buf, p.tA, p.tB, 1, p.a, p.b, 0, p.c) }

// bufLen is the packing scratch of a product with C m×n over k.
func bufLen(m, n, k int) int { return gemm.BufLen(m, n, k) }
