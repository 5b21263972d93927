//go:build !openblas

package main

import "github.com/seine-ml/seine/internal/gemm"

// pureGo is true when the products are those that generated the model:
// the default build's AVX2+FMA kernel (internal/gemm). Under -tags purego,
// or on a CPU without AVX2 and FMA, the portable kernel rounds a·b + s
// twice instead of once, so the bits differ.
var pureGo = gemm.Accelerated()
