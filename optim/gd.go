package optim

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// GradientDescent is steepest descent,
//
//	x_{k+1} = x_k − α_k·∇f(x_k),
//
// with a fixed step α_k = Step, or, when Step is 0, α_k from a backtracking
// line search that halves a trial step until the sufficient-decrease
// (Armijo 1966) condition f(x_k − α·g_k) ≤ f(x_k) − c₁·α·‖g_k‖² holds
// (Nocedal & Wright 2006, algorithm 3.1). The first trial step of the first
// iteration is 1/‖g_0‖₂ (a step of unit length); later ones are twice the
// previous accepted step (common practice).
//
// The zero value is backtracking with c₁ = 1e-4.
type GradientDescent struct {
	// Step is the fixed step length α > 0; 0 means backtracking.
	// Negative is an error.
	Step float64
	// Decrease is c₁ of the sufficient-decrease condition, in (0, 1);
	// 0 means 1e-4. Unused with a fixed Step.
	Decrease float64

	xt, gt []float64
	alpha  float64
}

var _ Method = (*GradientDescent)(nil)

const backtrackMaxEvals = 60 // halvings before LineSearchFailed: 2⁻⁶⁰ ≈ 1e-18 (common practice)

func (m *GradientDescent) init(r *runner) (Status, error) {
	if m == nil {
		return running, ErrNilMethod
	}
	if !(m.Step >= 0) || math.IsInf(m.Step, 1) {
		return running, settingError("GradientDescent", "Step", m.Step, "finite and ≥ 0")
	}
	if m.Decrease == 0 {
		m.Decrease = defaultDecrease
	}
	if !(m.Decrease > 0 && m.Decrease < 1) {
		return running, settingError("GradientDescent", "Decrease", m.Decrease, "in (0, 1)")
	}
	n := len(r.x)
	m.xt, m.gt = grow(m.xt, n), grow(m.gt, n)
	m.alpha = 0
	return r.evalStart(), nil
}

func (m *GradientDescent) iterate(r *runner) Status {
	g2 := r.gnorm * r.gnorm
	if m.Step > 0 {
		floats.AddScaledTo(m.xt, r.x, -m.Step, r.g)
		f, st := r.eval(m.gt, m.xt)
		if st != running {
			return st
		}
		m.accept(r, f, m.Step)
		return running
	}
	a := 2 * m.alpha
	if m.alpha == 0 {
		a = 1 / r.gnorm
	}
	for range backtrackMaxEvals {
		floats.AddScaledTo(m.xt, r.x, -a, r.g)
		f, st := r.eval(m.gt, m.xt)
		if st != running {
			return st
		}
		if f <= r.f-m.Decrease*a*g2 {
			m.alpha = a
			m.accept(r, f, a)
			return running
		}
		a /= 2
	}
	return LineSearchFailed
}

// accept moves to the trial point x − a·g.
func (m *GradientDescent) accept(r *runner, f, a float64) {
	r.stepLen = a * r.gnorm
	r.x, m.xt = m.xt, r.x
	r.g, m.gt = m.gt, r.g
	r.f = f
	r.gnorm = floats.Norm(r.g, 2)
}
