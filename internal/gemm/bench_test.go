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

// BenchmarkKernel times the micro-kernel alone on one packed pair of
// panels (kc = 256) that stays in L1: the rate the blocking can at best
// approach.
func BenchmarkKernel(b *testing.B) {
	for _, port := range []bool{false, true} {
		b.Run(fmt.Sprintf("portable=%v", port), func(b *testing.B) {
			kern := kernelAsm
			if port || !haveAsm {
				kern = kernelGo
			}
			rng := rand.New(rand.NewPCG(1, 1))
			a := randGeneral(rng, 1, kc*mr, 0).Data
			p := randGeneral(rng, 1, kc*nr, 0).Data
			c := make([]float64, mr*nr)
			for b.Loop() {
				kern(kc, a, p, c, nr, true)
			}
			b.ReportMetric(2*float64(mr*nr*kc)*float64(b.N)/b.Elapsed().Seconds()/1e9, "GFLOP/s")
		})
	}
}
