package nn

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/blas/gonum"

	"github.com/seine-ml/seine/internal/gemm"
	"github.com/seine-ml/seine/spec"
)

// TestBLASAgrees: cost and gradient with the products of this build agree
// within 1e-12 relative with those of the reference products, on a net
// wide enough for several blocks of every product. The reference is
// gonum's pure-Go Dgemm under -tags openblas (against OpenBLAS), and
// internal/gemm's portable Go kernel otherwise (against the AVX2+FMA
// kernel, where this CPU and build have it; internal/gemm checks both
// kernels against a triple loop and gonum's Dgemm).
func TestBLASAgrees(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	n := mustCompile(t, testSpec(70, []int{200, 30}, spec.Tanh, outSoftmax))
	n.spec.Penalty.L2 = 0.5
	x, y := testData(rng, 700, 70, outSoftmax, false)
	p := awayFromZero(rng, n.NumParams())
	eval := func() (float64, []float64) {
		o, err := NewObjective(n, x, y, ObjectiveOptions{Chunk: 256})
		require.NoError(t, err)
		g := make([]float64, len(p))
		return o.Eval(g, p), g
	}
	c, g := eval()
	t.Logf("BLAS in use: %T; internal/gemm assembly kernel: %v", blas64.Implementation(), gemm.Accelerated())

	prevBLAS := blas64.Implementation()
	blas64.Use(gonum.Implementation{})
	prevKernel := gemm.UsePortable(true)
	cRef, gRef := eval()
	blas64.Use(prevBLAS)
	gemm.UsePortable(prevKernel)

	const tol = 1e-12
	assert.InEpsilon(t, cRef, c, tol, "cost %.17g, reference %.17g", c, cRef)
	gMax, dMax := 0.0, 0.0
	for i := range g {
		gMax = math.Max(gMax, math.Abs(gRef[i]))
		dMax = math.Max(dMax, math.Abs(g[i]-gRef[i]))
	}
	t.Logf("relative difference: cost %.3g, gradient (max norm) %.3g", math.Abs(c-cRef)/math.Abs(cRef), dMax/gMax)
	assert.LessOrEqual(t, dMax, tol*gMax, "gradient: max difference %.3g, max |g| %.3g: relative %.3g > %g", dMax, gMax, dMax/gMax, tol)
}
