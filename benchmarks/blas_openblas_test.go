//go:build openblas

package benchmarks

import (
	"fmt"

	"gonum.org/v1/gonum/blas/blas64"
)

// backend names the matrix products in use: the BLAS that package nn
// selected (OpenBLAS through gonum's netlib binding, one thread).
func backend() string { return fmt.Sprintf("%T", blas64.Implementation()) }

// run computes C = op(A)·op(B) as nn does in this build.
func (p product) run() { blas64.Gemm(p.tA, p.tB, 1, p.a, p.b, 0, p.c) }

// bufLen is 0: OpenBLAS packs into its own buffers.
func bufLen(m, n, k int) int { return 0 }
