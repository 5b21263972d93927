package benchmarks

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
)

// blasImpl returns the BLAS that blas64 uses now.
func blasImpl() blas.Float64 { return blas64.Implementation() }
