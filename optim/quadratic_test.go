package optim

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// quadratic is f(x) = ½xᵀAx − bᵀx with A symmetric positive definite, so
// ∇f(x) = Ax − b and the minimiser solves Ax = b.
type quadratic struct {
	a *mat.SymDense
	b []float64
}

func (q *quadratic) Eval(grad, x []float64) float64 {
	n := len(x)
	ax := make([]float64, n)
	mat.NewVecDense(n, ax).MulVec(q.a, mat.NewVecDense(n, x))
	f := 0.5*floats.Dot(x, ax) - floats.Dot(q.b, x)
	if grad != nil {
		floats.SubTo(grad, ax, q.b)
	}
	return f
}

// newQuadratic builds A = Q·diag(λ)·Qᵀ with Q orthogonal (from the QR
// factorisation of a seeded Gaussian matrix) and eigenvalues λ spread
// geometrically over [1, cond], and b with standard normal entries.
func newQuadratic(n int, cond float64, seed uint64) (*quadratic, []float64) {
	lam := make([]float64, n)
	for i := range lam {
		lam[i] = math.Pow(cond, float64(i)/float64(n-1))
	}
	return newQuadraticEig(lam, seed)
}

// newQuadraticEig is newQuadratic with the eigenvalues given.
func newQuadraticEig(lam []float64, seed uint64) (*quadratic, []float64) {
	n := len(lam)
	rnd := rand.New(rand.NewPCG(seed, 7))
	g := mat.NewDense(n, n, nil)
	for i := range n {
		for j := range n {
			g.Set(i, j, rnd.NormFloat64())
		}
	}
	var qr mat.QR
	qr.Factorize(g)
	var q mat.Dense
	qr.QTo(&q)
	var ql mat.Dense
	ql.Apply(func(_, j int, v float64) float64 { return v * lam[j] }, &q)
	var a mat.Dense
	a.Mul(&ql, q.T())
	sym := mat.NewSymDense(n, nil)
	for i := range n {
		for j := i; j < n; j++ {
			sym.SetSym(i, j, (a.At(i, j)+a.At(j, i))/2)
		}
	}
	b := make([]float64, n)
	for i := range b {
		b[i] = rnd.NormFloat64()
	}
	// The solution of Ax = b from gonum's mat (Cholesky), outside this package.
	var chol mat.Cholesky
	if !chol.Factorize(sym) {
		panic("test matrix not positive definite")
	}
	var xs mat.VecDense
	if err := chol.SolveVecTo(&xs, mat.NewVecDense(n, b)); err != nil {
		panic(err)
	}
	return &quadratic{a: sym, b: b}, xs.RawVector().Data
}

func relDist(x, y []float64) float64 {
	return floats.Distance(x, y, 2) / floats.Norm(y, 2)
}

// Finite termination: with exact line searches, linear conjugate gradient
// minimises a strictly convex quadratic in at most n iterations
// (Nocedal & Wright 2006, theorem 5.2), and in at most r iterations when A
// has r distinct eigenvalues (their theorem 5.4); the nonlinear formulas
// all reduce to linear CG there. Curvature = 1e-10 makes the strong Wolfe
// search exact up to a relative 1e-10 in the slope (the secant step is
// exact on a quadratic). In floating point the n-step bound holds only for
// mild conditioning: measured with textbook linear CG on this generator,
// κ = 1000 still leaves a relative error of 2e-3 after 50 iterations. So
// the n-step case uses κ = 10 (steepest descent: 0.818 per iteration,
// 4e-5 after 50) and asks for 1e-7 (the exact search itself stalls on
// rounding near 1e-8: measured 1.25e-8 at iteration 26), and
// the r-step case uses κ = 1000 with r = 5. Steepest descent would need
// hundreds (κ = 10) or thousands (κ = 1000) of iterations, so both bounds
// can fail.
func TestCGFiniteTermination(t *testing.T) {
	const n = 50
	five := make([]float64, n)
	for i := range five {
		five[i] = []float64{1, 10, 50, 300, 1000}[i%5]
	}
	qFive, xsFive := newQuadraticEig(five, 4)
	qTen, xsTen := newQuadratic(n, 10, 1)
	cases := []struct {
		name    string
		q       *quadratic
		xs      []float64
		maxIter int
		tol     float64
	}{
		{"n-steps", qTen, xsTen, n, 1e-7},
		{"5-distinct-eigenvalues", qFive, xsFive, 5, 1e-8},
	}
	for _, c := range cases {
		for _, formula := range []CGFormula{PolakRibierePlus, FletcherReeves, HestenesStiefel, DaiYuan} {
			t.Run(c.name+"/"+formula.String(), func(t *testing.T) {
				m := &ConjugateGradient{Formula: formula, Restart: 10 * n, Decrease: 1e-12, Curvature: 1e-10}
				var iters int
				d := math.Inf(1)
				obs := func(s Step, x []float64) bool {
					// The current iterate: at rounding level the point of
					// lowest computed cost (Result.X) may be an earlier one.
					iters, d = s.Iter, relDist(x, c.xs)
					return d <= c.tol
				}
				res, err := Minimize(context.Background(), c.q, make([]float64, n), m,
					Limits{GradTol: 1e-300, Iterations: 10 * n, Observer: obs})
				require.NoError(t, err)
				assert.LessOrEqual(t, d, c.tol, "‖x − x*‖/‖x*‖ after %d iterations (%v)", iters, res.Status)
				assert.LessOrEqual(t, iters, c.maxIter, "iterations to reach %g", c.tol)
			})
		}
	}
}

// With exact steps, nonlinear CG on a quadratic produces the iterates of
// linear CG (Hestenes & Stiefel 1952; Nocedal & Wright 2006, algorithm
// 5.2), written out here from the textbook as an independent check.
func TestCGMatchesLinearCG(t *testing.T) {
	const n, iters = 50, 12
	q, _ := newQuadratic(n, 1000, 1)
	// Textbook linear CG from x0 = 0: r = b − Ax, p = r.
	want := make([][]float64, iters)
	x, r := make([]float64, n), slices.Clone(q.b)
	p, ap := slices.Clone(r), make([]float64, n)
	for k := range iters {
		mat.NewVecDense(n, ap).MulVec(q.a, mat.NewVecDense(n, p))
		rr := floats.Dot(r, r)
		a := rr / floats.Dot(p, ap)
		floats.AddScaled(x, a, p)
		floats.AddScaled(r, -a, ap)
		floats.AddScaledTo(p, r, floats.Dot(r, r)/rr, p)
		want[k] = slices.Clone(x)
	}
	var worst float64
	obs := func(s Step, x []float64) bool {
		worst = math.Max(worst, relDist(x, want[s.Iter-1]))
		return s.Iter == iters
	}
	m := &ConjugateGradient{Restart: 10 * n, Decrease: 1e-12, Curvature: 1e-10}
	_, err := Minimize(context.Background(), q, make([]float64, n), m, Limits{GradTol: 1e-300, Observer: obs})
	require.NoError(t, err)
	// Measured: the two sequences agree to ~1e-15 for 11 iterations; after
	// that rounding is amplified (×10 per iteration, as CG amplifies it at
	// κ = 1000) and by iteration 25 they differ by 1e-3. Over the first 12
	// iterations 1e-12 leaves a factor 100 over the measured gap; a wrong β
	// differs at iteration 2 by far more.
	assert.LessOrEqual(t, worst, 1e-12, "largest ‖x_k − x_k(linear CG)‖/‖x_k(linear CG)‖ over %d iterations", iters)
	t.Logf("largest relative distance to linear CG iterates: %.3g", worst)
}

// Gradient descent with step 1/L on a quadratic: x_{k+1} − x* =
// (I − A/L)(x_k − x*), and the eigenvalues of I − A/L lie in [0, 1 − μ/L],
// so ‖x_{k+1} − x*‖ ≤ (1 − μ/L)‖x_k − x*‖ (the textbook linear rate; here
// an identity of linear algebra). μ = 1, L = 10. A step of 2/L would give a
// ratio near 1 and fail.
func TestGradientDescentContraction(t *testing.T) {
	const n, cond = 50, 10.0
	q, xs := newQuadratic(n, cond, 2)
	rate := 1 - 1/cond
	prev := floats.Norm(xs, 2) // x0 = 0
	var worst float64
	obs := func(s Step, x []float64) bool {
		e := floats.Distance(x, xs, 2)
		// Slack 1e-12 relative: rounding of one matrix-vector product.
		assert.LessOrEqual(t, e, rate*prev+1e-12*floats.Norm(xs, 2), "iteration %d: error against (1 − μ/L)·%.6g", s.Iter, prev)
		worst = math.Max(worst, e/prev)
		prev = e
		return false
	}
	_, err := Minimize(context.Background(), q, make([]float64, n), &GradientDescent{Step: 1 / cond},
		Limits{Iterations: 200, GradTol: 1e-300, Observer: obs})
	require.NoError(t, err)
	t.Logf("largest error ratio %.6f, bound %.6f", worst, rate)
}

// L-BFGS reaches a gradient norm of 1e-10 on the quadratic with κ = 1000.
func TestLBFGSQuadratic(t *testing.T) {
	const n = 50
	q, xs := newQuadratic(n, 1000, 3)
	res, err := Minimize(context.Background(), q, make([]float64, n), &LBFGS{}, Limits{GradTol: 1e-14})
	require.NoError(t, err)
	assert.LessOrEqual(t, res.GradNorm, 1e-10, "‖∇f‖ after %d iterations (%v)", res.Iterations, res.Status)
	// ‖x − x*‖ ≤ ‖∇f‖/λ_min = ‖∇f‖ with λ_min = 1.
	assert.LessOrEqual(t, floats.Distance(res.X, xs, 2), 1e-10, "‖x − x*‖")
	t.Logf("%d iterations, %g evaluations, status %v", res.Iterations, res.Evaluations, res.Status)
}
