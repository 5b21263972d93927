package optim

// Tests that pin each update formula: one or two steps of every method on a
// tiny problem, compared with values worked by hand. Convergence tests
// survive a wrong term (a dropped bias correction, a swapped β formula, a
// wrong scaling); these do not. The working is in each comment; the
// fractions were checked with exact rational arithmetic in
// testdata/formula_values.py (Python's fractions module, a calculator only).
//
// Unless a case says otherwise the problem is
//
//	f(x) = ½xᵀAx = ½(x₁² + 4x₂²),   A = diag(1, 4),   ∇f(x) = (x₁, 4x₂),
//
// and the steps are observed through the package's own hooks:
// Limits.Observer gets x_k and the Step after every iteration, and a
// wrapper of the objective records every point at which it is evaluated
// (the trial points of the line searches, Nesterov's look-ahead points).

import (
	"context"
	"fmt"
	"math"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// diagQuadratic is f(x) = ½Σ λ_i x_i², ∇f(x)_i = λ_i x_i.
func diagQuadratic(lambda ...float64) Objective {
	return Func(func(grad, x []float64) float64 {
		var f float64
		for i, l := range lambda {
			f += 0.5 * l * x[i] * x[i]
			if grad != nil {
				grad[i] = l * x[i]
			}
		}
		return f
	})
}

// evalLog records every point at which its objective is evaluated.
type evalLog struct {
	Objective
	points [][]float64
}

func (l *evalLog) Eval(grad, x []float64) float64 {
	l.points = append(l.points, slices.Clone(x))
	return l.Objective.Eval(grad, x)
}

// observed is what a run shows of its first iterations.
type observed struct {
	iterates [][]float64 // x_1, x_2, … as given to the observer
	steps    []Step
	evals    [][]float64 // every point evaluated, x0 first for full-batch methods
}

// observe runs m on f from x0 for at most iters iterations.
func observe(t *testing.T, f Objective, x0 []float64, m Method, iters int) observed {
	t.Helper()
	log := &evalLog{Objective: f}
	var o observed
	_, err := Minimize(context.Background(), log, x0, m, Limits{Iterations: iters, GradTol: 1e-300,
		Observer: func(s Step, x []float64) bool {
			o.iterates = append(o.iterates, slices.Clone(x))
			o.steps = append(o.steps, s)
			return false
		}})
	require.NoError(t, err)
	o.evals = log.points
	return o
}

// roundTol is the tolerance of a value of order 1 computed in float64 by
// a few dozen operations, each rounding by at most 2⁻⁵³ relative:
// well under 1e-14. A wrong term changes these values by 1e-3 or more.
const roundTol = 1e-14

func assertPoints(t *testing.T, want, got [][]float64, tol float64, what string) {
	t.Helper()
	if !assert.Len(t, got, len(want), what) {
		return
	}
	for k := range want {
		assert.InDeltaSlice(t, want[k], got[k], tol, "%s %d", what, k)
	}
}

// Gradient descent with a fixed step α = 1/8 from x0 = (1, 1):
//
//	g_0 = (1, 4),       x_1 = (1 − 1/8, 1 − 4/8)      = (0.875, 0.5)
//	g_1 = (0.875, 2),   x_2 = (0.875 − 0.109375, 0.5 − 0.25) = (0.765625, 0.25)
//
// Step.StepLen = α‖g_k‖: ‖g_0‖/8 = √17/8, ‖g_1‖/8 = √4.765625/8. Every value
// but the norms is a dyadic fraction, exact in binary, so those compare
// exactly.
func TestFormulaGradientDescentFixed(t *testing.T) {
	o := observe(t, diagQuadratic(1, 4), []float64{1, 1}, &GradientDescent{Step: 0.125}, 2)
	assert.Equal(t, [][]float64{{0.875, 0.5}, {0.765625, 0.25}}, o.iterates)
	require.Len(t, o.steps, 2)
	assert.InDelta(t, math.Sqrt(17)/8, o.steps[0].StepLen, roundTol)
	assert.InDelta(t, math.Sqrt(4.765625)/8, o.steps[1].StepLen, roundTol)
	// f(x_1) = ½(0.875² + 4·0.5²) = 0.8828125, exact.
	assert.Equal(t, 0.8828125, o.steps[0].Cost)
	// One evaluation per step after the one at x0.
	assert.Equal(t, []float64{2, 3}, []float64{o.steps[0].Evaluations, o.steps[1].Evaluations})
}

// Backtracking (Armijo 1966; Nocedal & Wright 2006, algorithm 3.1): the
// first trial step is 1/‖g_0‖, later ones twice the last accepted step,
// halved until f(x − αg) ≤ f(x) − c₁α‖g‖². On f = ½λx² a trial α is
// accepted exactly when α ≤ 2(1 − c₁)/λ.
func TestFormulaGradientDescentBacktracking(t *testing.T) {
	cases := []struct {
		name     string
		lambda   float64
		x0       float64
		decrease float64
		iters    int
		evals    []float64 // every point evaluated, x0 first
		iterates []float64
		stepLens []float64
	}{
		{
			// λ = 1, x0 = 3/4, c₁ = 1e-4 (accept α ≤ 1.9998):
			//   iteration 1: α = 1/‖g_0‖ = 4/3 accepted: x_1 = 3/4 − 4/3·3/4 = −1/4.
			//   iteration 2: α = 2·4/3 = 8/3 rejected (x = −1/4 + 8/3·1/4 = 5/12,
			//   f = 25/288 > f(x_1) = 9/288); α = 4/3 accepted: x_2 = −1/4 + 1/3 = 1/12.
			name: "doubling then halving", lambda: 1, x0: 0.75, iters: 2,
			evals:    []float64{0.75, -0.25, 5.0 / 12, 1.0 / 12},
			iterates: []float64{-0.25, 1.0 / 12},
			stepLens: []float64{1, 1.0 / 3}, // α·|g|: 4/3·3/4, 4/3·1/4
		},
		{
			// λ = 4, x0 = 3/4, c₁ = 1/2 (accept α ≤ 1/4): f_0 = 9/8, g_0 = 3.
			//   α = 1/3: x = 3/4 − 1 = −1/4, f = 1/8 > 9/8 − ½·⅓·9 = −3/8: rejected
			//   (without the c₁ term, or with ‖g‖ for ‖g‖², it would pass:
			//   9/8 − ½·⅓·3 = 5/8);
			//   α = 1/6: x_1 = 3/4 − 1/2 = 1/4, f = 1/8 ≤ 9/8 − ½·⅙·9 = 3/8: accepted.
			name: "sufficient decrease", lambda: 4, x0: 0.75, decrease: 0.5, iters: 1,
			evals:    []float64{0.75, -0.25, 0.25},
			iterates: []float64{0.25},
			stepLens: []float64{0.5},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			o := observe(t, diagQuadratic(c.lambda), []float64{c.x0}, &GradientDescent{Decrease: c.decrease}, c.iters)
			var evals, iterates, stepLens []float64
			for _, p := range o.evals {
				evals = append(evals, p[0])
			}
			for k, x := range o.iterates {
				iterates = append(iterates, x[0])
				stepLens = append(stepLens, o.steps[k].StepLen)
			}
			assert.InDeltaSlice(t, c.evals, evals, roundTol, "points evaluated")
			assert.InDeltaSlice(t, c.iterates, iterates, roundTol, "iterates")
			assert.InDeltaSlice(t, c.stepLens, stepLens, roundTol, "step lengths")
		})
	}
}

// Nonlinear conjugate gradient, one step and the first trial point of the
// next. With c₂ = 0.9 the first trial step α_0 = 1/‖g_0‖ meets the strong
// Wolfe conditions on both starts below, so x_1 = x_0 − g_0/‖g_0‖ exactly as
// in the textbook. Then, with g = g_0, g₊ = g_1, y = g₊ − g, d_0 = −g_0:
//
//	PR+  β = max(0, g₊ᵀy/gᵀg)   (Polak & Ribière 1969; Powell 1986)
//	FR   β = g₊ᵀg₊/gᵀg          (Fletcher & Reeves 1964)
//	HS   β = g₊ᵀy/d_0ᵀy         (Hestenes & Stiefel 1952)
//	DY   β = g₊ᵀg₊/d_0ᵀy        (Dai & Yuan 1999)
//
// d_1 = −g_1 + β·d_0 (d_1 = −g_1 when β = 0: a restart), and the first
// trial step of iteration 2 is α_0·g_0ᵀd_0/g_1ᵀd_1 (Nocedal & Wright 2006,
// eq. 3.60), so the third point evaluated is x_1 + α_0·(g_0ᵀd_0/g_1ᵀd_1)·d_1.
//
// Start (1.2, 0.4): g_0 = (1.2, 1.6), ‖g_0‖ = 2, α_0 = 1/2, x_1 = (0.6, −0.4),
// g_1 = (0.6, −1.6); φ'(0) = −4, φ'(α_0) = g_1ᵀd_0 = 46/25 (|46/25| ≤ 0.9·4);
// gᵀg = 4, g₊ᵀg₊ = 73/25, g₊ᵀg = −46/25, y = (−0.6, −3.2), d_0ᵀy = 146/25:
//
//	PR+  β = (73 + 46)/100 = 1.19   d_1 = (−507/250, −38/125)  g_1ᵀd_1 = −913/1250
//	FR   β = 73/100                  d_1 = (−369/250, 54/125)   g_1ᵀd_1 = −1971/1250
//	HS   β = 119/146                 d_1 = (−576/365, 108/365)  g_1ᵀd_1 = −2592/1825
//	DY   β = 73/146 = 1/2            d_1 = (−6/5, 4/5)          g_1ᵀd_1 = −2
//
// Start (3, 1): g_0 = (3, 4), ‖g_0‖ = 5, α_0 = 1/5, x_1 = (2.4, 0.2),
// g_1 = (2.4, 0.8); φ'(0) = −25, φ'(α_0) = −52/5; gᵀg = 25, g₊ᵀg₊ = 32/5,
// g₊ᵀg = 52/5, d_0ᵀy = 73/5. Here g₊ᵀy = −4 < 0, so PR+ clamps β to 0 and
// restarts along −g_1 with g_1ᵀd_1 = −32/5, where plain PR would take
// β = −4/25:
//
//	PR+  β = max(0, −4/25) = 0      d_1 = (−12/5, −4/5)        g_1ᵀd_1 = −32/5
//	FR   β = 32/125                  d_1 = (−396/125, −228/125) g_1ᵀd_1 = −5664/625
//	HS   β = −20/73                  d_1 = (−576/365, 108/365)  g_1ᵀd_1 = −1296/365
//	DY   β = 32/73                   d_1 = (−1356/365, −932/365) g_1ᵀd_1 = −800/73
//
// With Restart = 1 the method restarts after every iteration whatever the
// formula: from (1.2, 0.4), d_1 = −g_1, g_1ᵀd_1 = −73/25, and the trial
// point is x_1 + ½·(−4)/(−73/25)·d_1 = x_1 − (50/73)·g_1 = (69/365, 254/365).
func TestFormulaConjugateGradient(t *testing.T) {
	cases := []struct {
		formula CGFormula
		restart int
		x0      []float64
		x1      []float64
		trial   []float64 // third point evaluated: x_1 + α_0·(g_0ᵀd_0/g_1ᵀd_1)·d_1
	}{
		{PolakRibierePlus, 0, []float64{1.2, 0.4}, []float64{0.6, -0.4}, []float64{-22611.0 / 4565, -5626.0 / 4565}},
		{FletcherReeves, 0, []float64{1.2, 0.4}, []float64{0.6, -0.4}, []float64{-1393.0 / 1095, 54.0 / 365}},
		{HestenesStiefel, 0, []float64{1.2, 0.4}, []float64{0.6, -0.4}, []float64{-73.0 / 45, 1.0 / 60}},
		{DaiYuan, 0, []float64{1.2, 0.4}, []float64{0.6, -0.4}, []float64{-0.6, 0.4}},
		{PolakRibierePlus, 0, []float64{3, 1}, []float64{2.4, 0.2}, []float64{21.0 / 40, -17.0 / 40}},
		{FletcherReeves, 0, []float64{3, 1}, []float64{2.4, 0.2}, []float64{1539.0 / 2360, -1903.0 / 2360}},
		{HestenesStiefel, 0, []float64{3, 1}, []float64{2.4, 0.2}, []float64{8.0 / 45, 37.0 / 60}},
		{DaiYuan, 0, []float64{3, 1}, []float64{2.4, 0.2}, []float64{141.0 / 200, -193.0 / 200}},
		{FletcherReeves, 1, []float64{1.2, 0.4}, []float64{0.6, -0.4}, []float64{69.0 / 365, 254.0 / 365}},
	}
	for _, c := range cases {
		name := fmt.Sprintf("%v/start %v/restart %d", c.formula, c.x0, c.restart)
		t.Run(name, func(t *testing.T) {
			o := observe(t, diagQuadratic(1, 4), c.x0, &ConjugateGradient{Formula: c.formula, Restart: c.restart, Curvature: 0.9}, 2)
			require.GreaterOrEqual(t, len(o.evals), 3)
			assertPoints(t, [][]float64{c.x0, c.x1, c.trial}, o.evals[:3], roundTol, "point evaluated")
			assert.InDeltaSlice(t, c.x1, o.iterates[0], roundTol, "x_1")
		})
	}
}

// L-BFGS (Nocedal 1980; Liu & Nocedal 1989), two steps from x0 = (1.2, 0.4).
// Iteration 1: memory empty, d_0 = −g_0 = (−1.2, −1.6), first trial step
// 1/‖d_0‖ = 1/2, accepted (c₂ = 0.9; as in the CG case above):
// x_1 = (0.6, −0.4), g_1 = (0.6, −1.6). The pair
//
//	s = x_1 − x_0 = (−0.6, −0.8),  y = g_1 − g_0 = (−0.6, −3.2),
//	sᵀy = 73/25,  yᵀy = 53/5,  ρ = 1/sᵀy = 25/73,
//	γ = sᵀy/yᵀy = 73/265                     (Nocedal & Wright 2006, eq. 7.20).
//
// Iteration 2, two-loop recursion (their algorithm 7.4) on q = g_1:
//
//	a = ρ·sᵀq = 23/73,   q ← q − a·y = (288/365, −216/365),
//	r = γ·q = (288/1325, −216/1325),
//	b = ρ·yᵀr = 2592/19345,   r ← r + (a − b)·s,
//	d_1 = −r = (−2103/19345, 5956/19345),
//
// the same as −H_1·g_1 with the BFGS update of γI (checked in the script).
// The first trial step is 1, so the third point evaluated is
// x_1 + d_1 = (9504/19345, −1782/19345). With γ = 1, or γ = sᵀy/sᵀs, or
// without the second loop, the point differs by more than 0.01.
func TestFormulaLBFGS(t *testing.T) {
	o := observe(t, diagQuadratic(1, 4), []float64{1.2, 0.4}, &LBFGS{}, 2)
	require.GreaterOrEqual(t, len(o.evals), 3)
	want := [][]float64{{1.2, 0.4}, {0.6, -0.4}, {9504.0 / 19345, -1782.0 / 19345}}
	assertPoints(t, want, o.evals[:3], roundTol, "point evaluated")
}

// With two pairs stored, the two-loop recursion must give d = −H·g for the
// matrix H of two BFGS updates of H⁰ = γI, oldest pair first:
//
//	H ← (I − ρ s yᵀ) H (I − ρ y sᵀ) + ρ s sᵀ,   ρ = 1/sᵀy
//
// (Nocedal & Wright 2006, eq. 6.17 and §7.2: algorithm 7.4 computes this
// product without forming H), with γ from the newest pair. H is formed here
// densely with gonum's mat. The pairs and g are arbitrary with sᵀy > 0.
// Tolerance: both sides are a few dozen operations on values of order 1.
func TestFormulaLBFGSTwoLoop(t *testing.T) {
	s := [][]float64{{1, 0.5, -0.25}, {-0.5, 2, 1}}
	y := [][]float64{{2, 0.25, -1}, {0.5, 3, 0.75}}
	g := []float64{0.3, -1.2, 2}
	m := &LBFGS{Memory: 2}
	r := newRunner(context.Background(), diagQuadratic(1, 1, 1), []float64{0, 0, 0}, Limits{})
	_, err := m.init(r)
	require.NoError(t, err)
	for k := range s {
		copy(m.s[m.head], s[k])
		copy(m.y[m.head], y[k])
		sy := floats.Dot(s[k], y[k])
		require.Positive(t, sy)
		m.rho[m.head] = 1 / sy
		m.gamma = sy / floats.Dot(y[k], y[k])
		m.head = (m.head + 1) % m.Memory
		m.count++
	}
	gd := m.direction(g)

	h := mat.NewDense(3, 3, nil)
	for i := range 3 {
		h.Set(i, i, m.gamma)
	}
	for k := range s {
		sv, yv := mat.NewVecDense(3, s[k]), mat.NewVecDense(3, y[k])
		rho := 1 / floats.Dot(s[k], y[k])
		v := mat.NewDense(3, 3, nil) // I − ρ y sᵀ
		v.Outer(-rho, yv, sv)
		for i := range 3 {
			v.Set(i, i, v.At(i, i)+1)
		}
		var vh, hv mat.Dense
		vh.Mul(v.T(), h)
		hv.Mul(&vh, v)
		var ss mat.Dense
		ss.Outer(rho, sv, sv)
		h.Add(&hv, &ss)
	}
	want := mat.NewVecDense(3, nil)
	want.MulVec(h, mat.NewVecDense(3, g))
	want.ScaleVec(-1, want)
	assert.InDeltaSlice(t, want.RawVector().Data, m.d, 1e-13, "two-loop direction against −H·g")
	assert.InDelta(t, floats.Dot(g, want.RawVector().Data), gd, 1e-13, "gᵀd")
}

// Momentum, heavy ball (Polyak 1964) against Nesterov's look-ahead
// (Nesterov 1983; Sutskever et al. 2013), η = 1/8, β = 1/2, x0 = (1, 1),
// v_0 = 0, one batch:
//
//	heavy ball:  g = ∇f(x_0) = (1, 4),  v_1 = −η·g = (−1/8, −1/2),  x_1 = (7/8, 1/2);
//	             g = ∇f(x_1) = (7/8, 2),  v_2 = β·v_1 − η·g = (−11/64, −1/2),
//	             x_2 = (45/64, 0).
//	Nesterov:    iteration 1 is the same (the look-ahead x_0 + β·0 is x_0);
//	             p = x_1 + β·v_1 = (13/16, 1/4),  g = ∇f(p) = (13/16, 1),
//	             v_2 = β·v_1 − η·g = (−21/128, −3/8),  x_2 = (91/128, 1/8).
//	decay 1:     η_e = η/(1 + e): η_1 = 1/16 in iteration 2 (heavy ball):
//	             v_2 = β·v_1 − η_1·(7/8, 2) = (−15/128, −3/8), x_2 = (97/128, 1/8).
//
// Step k reports the batch estimates met during the epoch, each taken
// before the update: Cost = f at the point evaluated, GradNorm = ‖g‖ there,
// StepLen = ‖x_k − x_{k−1}‖ = ‖v_k‖ for one batch. All values are dyadic,
// exact in binary, so they compare exactly; the norms within rounding.
func TestFormulaMomentum(t *testing.T) {
	cases := []struct {
		name     string
		m        *Momentum
		evals    [][]float64 // every point evaluated
		iterates [][]float64
		cost2    float64 // Step 2's Cost: f at the second point evaluated
		gnorm2   float64
		stepLen2 float64
	}{
		{"heavy ball", &Momentum{Rate: 0.125, Beta: 0.5},
			[][]float64{{1, 1}, {0.875, 0.5}},
			[][]float64{{0.875, 0.5}, {45.0 / 64, 0}},
			0.5 * (0.875*0.875 + 4*0.25), math.Hypot(0.875, 2), math.Hypot(11.0/64, 0.5)},
		{"Nesterov", &Momentum{Rate: 0.125, Beta: 0.5, Nesterov: true},
			[][]float64{{1, 1}, {13.0 / 16, 0.25}},
			[][]float64{{0.875, 0.5}, {91.0 / 128, 0.125}},
			0.5 * (13.0/16*13.0/16*1 + 4*0.0625), math.Hypot(13.0/16, 1), math.Hypot(21.0/128, 0.375)},
		{"heavy ball, decay", &Momentum{Rate: 0.125, Beta: 0.5, Decay: 1},
			[][]float64{{1, 1}, {0.875, 0.5}},
			[][]float64{{0.875, 0.5}, {97.0 / 128, 0.125}},
			0.5 * (0.875*0.875 + 4*0.25), math.Hypot(0.875, 2), math.Hypot(15.0/128, 0.375)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			o := observe(t, diagQuadratic(1, 4), []float64{1, 1}, c.m, 2)
			assert.Equal(t, c.evals, o.evals, "points evaluated")
			assert.Equal(t, c.iterates, o.iterates, "iterates")
			require.Len(t, o.steps, 2)
			assert.Equal(t, 2.5, o.steps[0].Cost, "f(x_0)")
			assert.InDelta(t, math.Sqrt(17), o.steps[0].GradNorm, roundTol)
			assert.InDelta(t, math.Hypot(0.125, 0.5), o.steps[0].StepLen, roundTol)
			assert.Equal(t, c.cost2, o.steps[1].Cost)
			assert.InDelta(t, c.gnorm2, o.steps[1].GradNorm, roundTol)
			assert.InDelta(t, c.stepLen2, o.steps[1].StepLen, roundTol)
		})
	}
}

// Adam (Kingma & Ba 2015, algorithm 1), η = 0.1, β₁ = 0.9, β₂ = 0.999,
// from x0 = (1, 1), one batch, so t = k. Step 1, g = (1, 4):
//
//	m = 0.1·g = (0.1, 0.4),   v = 0.001·g² = (0.001, 0.016),
//	m̂ = m/(1 − 0.9) = g,      v̂ = v/(1 − 0.999) = g²,
//	x_1 = x_0 − η·m̂/(√v̂ + ε) = (1 − 0.1/(1 + ε), 1 − 0.4/(4 + ε)).
//
// With ε = 0.5: x_1 = (14/15, 41/45); with ε = 1e-8: x_1 ≈ (0.9, 0.9), the
// step of length η per coordinate that the bias corrections give (without
// them it would be 0.1/√0.001·η ≈ 3.16η). Step 2, g = ∇f(x_1) = (14/15, 164/45)
// for ε = 0.5:
//
//	m = 0.9·(0.1, 0.4) + 0.1·g = (0.18333…, 0.72444…),   m̂ = m/(1 − 0.81) = m/0.19,
//	v = 0.999·(0.001, 0.016) + 0.001·g² = (0.0018701…, 0.0292659…),
//	v̂ = v/(1 − 0.998001) = v/0.001999,
//	x_2 = x_1 − η·m̂/(√v̂ + ε) = (0.86756887…, 0.82297815…).
//
// With Decay = 1, step 2 uses η_1 = η/2 = 0.05: x_2 = (0.90045110…, 0.86704463…).
// The decimals come from the same formulas evaluated in float64 by the
// script; the tolerance covers rounding only.
func TestFormulaAdam(t *testing.T) {
	cases := []struct {
		name     string
		m        *Adam
		iterates [][]float64
	}{
		{"epsilon 0.5", &Adam{Rate: 0.1, Epsilon: 0.5},
			[][]float64{{14.0 / 15, 41.0 / 45}, {0.8675688745059371, 0.8229781594486597}}},
		{"default epsilon", &Adam{Rate: 0.1},
			[][]float64{{0.900000001, 0.9000000002499999}, {0.8004122297123382, 0.8004122281815201}}},
		{"decay", &Adam{Rate: 0.1, Epsilon: 0.5, Decay: 1},
			[][]float64{{14.0 / 15, 41.0 / 45}, {0.9004511039196352, 0.8670446352798854}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			o := observe(t, diagQuadratic(1, 4), []float64{1, 1}, c.m, 2)
			assertPoints(t, c.iterates, o.iterates, roundTol, "x")
		})
	}
}

// The decay schedule η_e = Rate/(1 + Decay·e), e counted from 0, as the
// Momentum and Adam docs state; Rate 0.1, Decay 0.5.
func TestFormulaDecay(t *testing.T) {
	for _, c := range []struct {
		e    int
		want float64
	}{
		{0, 0.1},         // 0.1/1
		{1, 0.1 / 1.5},   // 0.0666…
		{2, 0.05},        // 0.1/2
		{10, 0.1 / 6},    // 0.1/(1 + 5)
		{99, 0.1 / 50.5}, // 0.1/(1 + 49.5)
	} {
		assert.InDelta(t, c.want, decayed(0.1, 0.5, c.e), 1e-17, "epoch %d", c.e)
	}
	assert.Equal(t, 0.1, decayed(0.1, 0, 7), "no decay")
}

// twoBatches is f(x) = ¼·f_0(x) + ¾·f_1(x) in one dimension, with batch 0
// f_0 = ½x² of share 1/4 and batch 1 f_1 = (3/2)x² of share 3/4. Shuffle
// keeps the order, so every epoch is batch 0 then batch 1.
type twoBatches struct{}

func (twoBatches) Eval(grad, x []float64) float64 {
	if grad != nil {
		grad[0] = 0.25*x[0] + 0.75*3*x[0]
	}
	return 0.25*0.5*x[0]*x[0] + 0.75*1.5*x[0]*x[0]
}
func (twoBatches) Batches() int { return 2 }
func (twoBatches) EvalBatch(grad, x []float64, k int) float64 {
	l := []float64{1, 3}[k]
	if grad != nil {
		grad[0] = l * x[0]
	}
	return 0.5 * l * x[0] * x[0]
}
func (twoBatches) Share(k int) float64 { return []float64{0.25, 0.75}[k] }
func (twoBatches) Shuffle(uint64)      {}

// One epoch of two batches: the update is made per batch, and the Step
// holds the share-weighted sums of the epoch (see Step). Heavy ball with
// η = 1/8, β = 1/2 from x0 = 1:
//
//	batch 0: g = 1, f_0 = 1/2,  v = −1/8, x = 7/8;
//	batch 1: g = 3·7/8 = 21/8, f_1 = (3/2)(7/8)² = 147/128,
//	         v = ½(−1/8) − (1/8)(21/8) = −25/64, x = 31/64.
//	Step: Cost = ¼·½ + ¾·147/128 = 505/512, GradNorm = |¼·1 + ¾·21/8| = 71/32,
//	      StepLen = |31/64 − 1| = 33/64, Evaluations = ¼ + ¾ = 1.
//
// Adam counts t over batches, not epochs: with η = 1/10 and ε = 1/2, batch
// 0 (t = 1) moves x by η·g/(|g| + ε) = 0.1/1.5 to x = 14/15; batch 1
// (t = 2) has g = 3·14/15 = 2.8, m = 0.9·0.1 + 0.1·2.8 = 0.37,
// v = 0.999·0.001 + 0.001·7.84 = 0.008839, m̂ = 0.37/0.19,
// v̂ = 0.008839/0.001999, x = 14/15 − 0.1·m̂/(√v̂ + ½) = 0.85111437… All values
// of the heavy ball are dyadic, exact in binary.
func TestFormulaEpoch(t *testing.T) {
	var steps []Step
	var xs []float64
	obs := func(s Step, x []float64) bool { steps, xs = append(steps, s), append(xs, x[0]); return false }
	_, err := Minimize(context.Background(), twoBatches{}, []float64{1}, &Momentum{Rate: 0.125, Beta: 0.5},
		Limits{Iterations: 1, GradTol: 1e-300, Observer: obs})
	require.NoError(t, err)
	require.Len(t, steps, 1)
	assert.Equal(t, 31.0/64, xs[0], "x after one epoch")
	assert.Equal(t, 505.0/512, steps[0].Cost, "Cost")
	assert.Equal(t, 71.0/32, steps[0].GradNorm, "GradNorm")
	assert.Equal(t, 33.0/64, steps[0].StepLen, "StepLen")
	assert.Equal(t, 1.0, steps[0].Evaluations, "Evaluations")

	xs = xs[:0]
	_, err = Minimize(context.Background(), twoBatches{}, []float64{1}, &Adam{Rate: 0.1, Epsilon: 0.5},
		Limits{Iterations: 1, GradTol: 1e-300, Observer: obs})
	require.NoError(t, err)
	mHat, vHat := 0.37/0.19, 0.008839/0.001999
	assert.InDelta(t, 14.0/15-0.1*mHat/(math.Sqrt(vHat)+0.5), xs[0], roundTol, "x after one epoch of Adam")
}

// The pieces of the strong Wolfe line search (Nocedal & Wright 2006,
// §3.5), each against a function whose answer is known in closed form.
func TestFormulaLineSearch(t *testing.T) {
	t.Run("cubicMin", func(t *testing.T) {
		// φ(α) = α³ − 3α, φ' = 3α² − 3: its local minimiser is α = 1.
		// From (0, φ 0, φ' −3) and (2, φ 2, φ' 9) the interpolating cubic
		// is φ itself, so eq. 3.59 must return 1, in either order.
		assert.InDelta(t, 1, cubicMin(0, 0, -3, 2, 2, 9), roundTol)
		assert.InDelta(t, 1, cubicMin(2, 2, 9, 0, 0, -3), roundTol)
		// φ(α) = (α − 0.3)²: a quadratic is a cubic too; minimiser 0.3.
		assert.InDelta(t, 0.3, cubicMin(0, 0.09, -0.6, 1, 0.49, 1.4), roundTol)
		// φ(α) = α³ + 3α, φ' = 3α² + 3 > 0, has no stationary point: NaN
		// from (0, φ 0, φ' 3) and (1, φ 4, φ' 6).
		assert.True(t, math.IsNaN(cubicMin(0, 0, 3, 1, 4, 6)))
	})
	t.Run("secant", func(t *testing.T) {
		// The slopes of (α − 0.3)², −0.6 at 0 and 1.4 at 1, vanish at 0.3.
		assert.InDelta(t, 0.3, secant(0, -0.6, 1, 1.4), roundTol)
		assert.InDelta(t, 0.3, secant(1, 1.4, 0, -0.6), roundTol)
		assert.True(t, math.IsNaN(secant(0, 1, 1, 1)))
	})
	t.Run("decrease", func(t *testing.T) {
		// φ(0) = 1, φ'(0) = −1, c₁ = 1/4: Armijo accepts φ(α) ≤ 1 − α/4;
		// within the rounding tolerance of φ(0) the approximate form
		// (Hager & Zhang 2005) accepts φ'(α) ≤ (2c₁ − 1)φ'(0) = 1/2.
		w := wolfe{c1: 0.25, c2: 0.9}
		l := &line{f0: 1, d0: -1, fTol: 1e-12}
		for _, c := range []struct {
			name string
			p    point
			want bool
		}{
			{"Armijo met", point{alpha: 2, f: 0.5, dphi: 5}, true},
			{"Armijo missed", point{alpha: 2, f: 0.51, dphi: 5}, false},
			{"approximate, slope low enough", point{alpha: 2, f: 1, dphi: 0.5}, true},
			{"approximate, slope too high", point{alpha: 2, f: 1, dphi: 0.6}, false},
			{"cost above φ(0) + fTol", point{alpha: 2, f: 1 + 1e-11, dphi: 0}, false},
		} {
			assert.Equal(t, c.want, w.decrease(l, c.p), c.name)
		}
	})
	t.Run("extrapolate then zoom", func(t *testing.T) {
		// CG's first search from (3, 1) with the default c₂ = 0.1: along
		// d = −(3, 4), φ'(α) = −25 + 73α, exact step α* = 25/73.
		//   α = 1/5: φ' = −52/5, descending and |φ'| > 2.5: extrapolate.
		//   The cubic through α = 0 and 1/5 is φ itself, minimiser
		//   25/73 ≈ 0.342, below the least extrapolation 1/5 + 1.1·1/5 = 0.42:
		//   α = 0.42, φ' = 5.66 > 0: zoom between 0.42 and 1/5.
		//   The cubic gives α* exactly, where φ' = 0: accepted.
		o := observe(t, diagQuadratic(1, 4), []float64{3, 1}, &ConjugateGradient{}, 1)
		at := func(a float64) []float64 { return []float64{3 - 3*a, 1 - 4*a} }
		want := [][]float64{{3, 1}, at(0.2), at(0.42), at(25.0 / 73)}
		assertPoints(t, want, o.evals, roundTol, "point evaluated")
	})
}
