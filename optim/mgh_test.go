package optim

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/optimize/functions"
)

// mghObjective adapts a test function of gonum's optimize/functions, which
// keeps the cost and the gradient apart, to Objective.
type mghObjective struct {
	f func(x []float64) float64
	g func(grad, x []float64)
}

func (p mghObjective) Eval(grad, x []float64) float64 {
	if grad != nil {
		p.g(grad, x)
	}
	return p.f(x)
}

var _ Objective = mghObjective{}

// mghProblem is one test function of Moré, Garbow & Hillstrom (1981) as
// shipped in gonum v0.17.0 optimize/functions, with the standard starting
// point from the doc comment there and the minima from its Minima method.
type mghProblem struct {
	name   string
	obj    Objective
	x0     []float64
	minima []functions.Minimum
}

func extRosenStart(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = 1
		if i%2 == 0 {
			x[i] = -1.2
		}
	}
	return x
}

func mghProblems() []mghProblem {
	const n = 10
	trigStart := make([]float64, n) // [1/n, …, 1/n], functions.go doc of Trigonometric
	varStart := make([]float64, n)  // (n−i)/n, i = 1…n, functions.go doc of VariablyDimensioned
	for i := range n {
		trigStart[i] = 1.0 / n
		varStart[i] = float64(n-i-1) / n
	}
	ones100 := make([]float64, 100)
	for i := range ones100 {
		ones100[i] = 1
	}
	pick := func(ms []functions.Minimum, dim int) []functions.Minimum {
		var out []functions.Minimum
		for _, m := range ms {
			if len(m.X) == dim {
				out = append(out, m)
			}
		}
		return out
	}
	return []mghProblem{
		{"Rosenbrock", mghObjective{functions.ExtendedRosenbrock{}.Func, functions.ExtendedRosenbrock{}.Grad},
			[]float64{-1.2, 1}, pick(functions.ExtendedRosenbrock{}.Minima(), 2)},
		{"Beale", mghObjective{functions.Beale{}.Func, functions.Beale{}.Grad},
			[]float64{1, 1}, functions.Beale{}.Minima()},
		{"PowellBadlyScaled", mghObjective{functions.PowellBadlyScaled{}.Func, functions.PowellBadlyScaled{}.Grad},
			[]float64{0, 1}, functions.PowellBadlyScaled{}.Minima()},
		{"BrownBadlyScaled", mghObjective{functions.BrownBadlyScaled{}.Func, functions.BrownBadlyScaled{}.Grad},
			[]float64{1, 1}, functions.BrownBadlyScaled{}.Minima()},
		{"Wood", mghObjective{functions.Wood{}.Func, functions.Wood{}.Grad},
			[]float64{-3, -1, -3, -1}, functions.Wood{}.Minima()},
		// Minima lists dimensions up to 10 only; at n = 100 the global
		// minimum f = 0 at x = (1, …, 1) follows from the definition (a sum
		// of squares that vanishes there).
		{"ExtendedRosenbrock100", mghObjective{functions.ExtendedRosenbrock{}.Func, functions.ExtendedRosenbrock{}.Grad},
			extRosenStart(100), []functions.Minimum{{X: ones100, F: 0, Global: true}}},
		{"Trigonometric10", mghObjective{functions.Trigonometric{}.Func, functions.Trigonometric{}.Grad},
			trigStart, functions.Trigonometric{}.Minima()},
		{"VariablyDimensioned10", mghObjective{functions.VariablyDimensioned{}.Func, functions.VariablyDimensioned{}.Grad},
			varStart, pick(functions.VariablyDimensioned{}.Minima(), n)},
	}
}

// reached reports whether x or its cost f is within tol of one of the
// listed minima, and which.
func reached(x []float64, f float64, minima []functions.Minimum, tol float64) (int, bool) {
	for k, m := range minima {
		if math.Abs(f-m.F) <= tol {
			return k, true
		}
		var d float64
		for i := range x {
			d = math.Max(d, math.Abs(x[i]-m.X[i]))
		}
		if d <= tol {
			return k, true
		}
	}
	return -1, false
}

// mghLimits stops on a gradient norm of 1e-10 (absolute, since the minima
// have |f| < 1), tight enough that the cost is within 1e-6 of the minimum.
var mghLimits = Limits{GradTol: 1e-10, Iterations: 10000}

func TestMGH(t *testing.T) {
	methods := []struct {
		name string
		new  func() Method
	}{
		{"CG", func() Method { return &ConjugateGradient{} }},
		{"CG-FR", func() Method { return &ConjugateGradient{Formula: FletcherReeves} }},
		{"CG-HS", func() Method { return &ConjugateGradient{Formula: HestenesStiefel} }},
		{"CG-DY", func() Method { return &ConjugateGradient{Formula: DaiYuan} }},
		{"LBFGS", func() Method { return &LBFGS{} }},
	}
	for _, p := range mghProblems() {
		for _, m := range methods {
			t.Run(p.name+"/"+m.name, func(t *testing.T) {
				res, err := Minimize(context.Background(), p.obj, p.x0, m.new(), mghLimits)
				require.NoError(t, err)
				// Source: Moré, Garbow & Hillstrom (1981), minima as listed in
				// gonum v0.17.0 optimize/functions.
				k, ok := reached(res.X, res.Cost, p.minima, 1e-6)
				if !ok {
					// The Formula variants other than the default are only
					// reported: FR and DY are known to stall on some of these
					// (Nocedal & Wright 2006, §5.2 on FR).
					if m.name == "CG" || m.name == "LBFGS" {
						assert.Fail(t, "minimum not reached", "%s: f = %.3g, status %v after %d iterations, %g evaluations; want a listed minimum within 1e-6",
							p.name, res.Cost, res.Status, res.Iterations, res.Evaluations)
					} else {
						t.Logf("%s: not reached: f = %.3g, status %v", p.name, res.Cost, res.Status)
					}
					return
				}
				t.Logf("minimum %d, f = %.3g, %v, %d iterations, %g evaluations", k, res.Cost, res.Status, res.Iterations, res.Evaluations)
			})
		}
	}
}
