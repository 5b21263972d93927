package gemm

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/blas"
)

// BenchmarkMul times the five products of one 256-row chunk of the
// benchmarks' large net (400→256→10) with each kernel.
func BenchmarkMul(b *testing.B) {
	shapes := []struct {
		tA, tB  blas.Transpose
		m, n, k int
	}{
		{blas.NoTrans, blas.Trans, 256, 256, 400},
		{blas.NoTrans, blas.Trans, 256, 10, 256},
		{blas.Trans, blas.NoTrans, 10, 256, 256},
		{blas.NoTrans, blas.NoTrans, 256, 256, 10},
		{blas.Trans, blas.NoTrans, 256, 400, 256},
	}
	for _, port := range []bool{false, true} {
		for _, s := range shapes {
			b.Run(fmt.Sprintf("portable=%v/%c%c/%dx%dx%d", port, s.tA, s.tB, s.m, s.n, s.k), func(b *testing.B) {
				prev := UsePortable(port)
				defer UsePortable(prev)
				rng := rand.New(rand.NewPCG(1, 1))
				x, y := operands(rng, s.tA, s.tB, s.m, s.n, s.k, 0)
				c := randGeneral(rng, s.m, s.n, 0)
				buf := make([]float64, BufLen(s.m, s.n, s.k))
				b.ReportAllocs()
				for b.Loop() {
					Mul(buf, s.tA, s.tB, 1, x, y, 0, c)
				}
				b.ReportMetric(2*float64(s.m*s.n*s.k)*float64(b.N)/b.Elapsed().Seconds()/1e9, "GFLOP/s")
			})
		}
	}
}
