package optim

import (
	"math"
	"strconv"

	"gonum.org/v1/gonum/floats"
)

// CGFormula selects the β_k of nonlinear conjugate gradient. With
// g = ∇f(x_k), g₊ = ∇f(x_{k+1}), y = g₊ − g and the direction d = d_k:
//
//	PolakRibierePlus  β = max(0, g₊ᵀy / gᵀg)   (Polak & Ribière 1969; Polyak 1969; "+" Powell 1986)
//	FletcherReeves    β = g₊ᵀg₊ / gᵀg          (Fletcher & Reeves 1964)
//	HestenesStiefel   β = g₊ᵀy / dᵀy           (Hestenes & Stiefel 1952)
//	DaiYuan           β = g₊ᵀg₊ / dᵀy          (Dai & Yuan 1999)
type CGFormula int

const (
	PolakRibierePlus CGFormula = iota // the default
	FletcherReeves
	HestenesStiefel
	DaiYuan
)

// String returns the name of the formula, e.g. "PolakRibierePlus".
func (c CGFormula) String() string {
	switch c {
	case PolakRibierePlus:
		return "PolakRibierePlus"
	case FletcherReeves:
		return "FletcherReeves"
	case HestenesStiefel:
		return "HestenesStiefel"
	case DaiYuan:
		return "DaiYuan"
	}
	return "CGFormula(" + strconv.Itoa(int(c)) + ")"
}

// ConjugateGradient is nonlinear conjugate gradient (Nocedal & Wright 2006,
// ch. 5.2):
//
//	x_{k+1} = x_k + α_k·d_k,   d_{k+1} = −∇f(x_{k+1}) + β_k·d_k,   d_0 = −∇f(x_0),
//
// with β_k from Formula and α_k from the strong Wolfe line search. The
// method restarts (d = −g) every Restart iterations and whenever d is not a
// descent direction (gᵀd ≥ 0) or β cannot be formed (dᵀy ≤ 0, or β not
// finite); a β of 0, as when PolakRibierePlus clamps, counts as a restart.
// The first trial step is 1/‖g_0‖₂ and later
// α_{k−1}·g_{k−1}ᵀd_{k−1}/(g_kᵀd_k) (Nocedal & Wright 2006, eq. 3.60).
//
// The zero value is Polak–Ribière+ with restarts every n iterations,
// c₁ = 1e-4 and c₂ = 0.1.
type ConjugateGradient struct {
	Formula CGFormula
	// Restart is the number of iterations between restarts; 0 means the
	// dimension n. Negative is an error.
	Restart int
	// Decrease is c₁ of the strong Wolfe conditions, in (0, 1); 0 means 1e-4.
	Decrease float64
	// Curvature is c₂ of the strong Wolfe conditions, in (Decrease, 1);
	// 0 means 0.1. A c₂ close to 0 makes the line search nearly exact.
	Curvature float64

	d, xt, gt []float64
	restart   int
	since     int     // iterations since the last restart
	alpha     float64 // last accepted step, 0 before the first
	gd        float64 // g_kᵀd_k
	prevGD    float64 // g_{k−1}ᵀd_{k−1}
}

var _ Method = (*ConjugateGradient)(nil)

func (m *ConjugateGradient) init(r *runner) (Status, error) {
	if m == nil {
		return running, ErrNilMethod
	}
	if m.Formula < PolakRibierePlus || m.Formula > DaiYuan {
		return running, settingError("ConjugateGradient", "Formula", m.Formula, "one of PolakRibierePlus, FletcherReeves, HestenesStiefel, DaiYuan")
	}
	if m.Restart < 0 {
		return running, settingError("ConjugateGradient", "Restart", m.Restart, "≥ 0")
	}
	if err := checkWolfe("ConjugateGradient", &m.Decrease, &m.Curvature, defaultCurvatureCG); err != nil {
		return running, err
	}
	n := len(r.x)
	m.restart = m.Restart
	if m.restart == 0 {
		m.restart = n
	}
	m.d, m.xt, m.gt = grow(m.d, n), grow(m.xt, n), grow(m.gt, n)
	m.alpha, m.since = 0, 0
	st := r.evalStart()
	if st == running {
		floats.ScaleTo(m.d, -1, r.g)
		m.gd = -r.gnorm * r.gnorm
	}
	return st, nil
}

func (m *ConjugateGradient) iterate(r *runner) Status {
	a0 := 1 / r.gnorm
	if m.alpha > 0 {
		a0 = m.alpha * m.prevGD / m.gd
	}
	p, st := wolfe{m.Decrease, m.Curvature}.search(r, r.x, m.d, m.xt, m.gt, r.f, m.gd, a0)
	if st != running {
		return st
	}
	a, fa := p.alpha, p.f
	r.stepLen = a * floats.Norm(m.d, 2)
	// One pass for g₊ᵀg₊, g₊ᵀg and dᵀg₊.
	var gg1, g1g, dg1 float64
	for i, v := range m.gt {
		gg1 += v * v
		g1g += v * r.g[i]
		dg1 += v * m.d[i]
	}
	gg := r.gnorm * r.gnorm
	dy := dg1 - m.gd
	var beta float64
	switch m.Formula {
	case PolakRibierePlus:
		beta = math.Max(0, (gg1-g1g)/gg)
	case FletcherReeves:
		beta = gg1 / gg
	case HestenesStiefel:
		beta = (gg1 - g1g) / dy
	case DaiYuan:
		beta = gg1 / dy
	}
	r.x, m.xt = m.xt, r.x
	r.g, m.gt = m.gt, r.g
	r.f, r.gnorm = fa, math.Sqrt(gg1)
	m.alpha, m.prevGD = a, m.gd
	m.since++
	if m.since >= m.restart || !(dy > 0) || !finite(beta) {
		beta = 0
	}
	// d = −g + β·d and gᵀd in one pass.
	var gd float64
	for i, gi := range r.g {
		di := -gi + beta*m.d[i]
		m.d[i] = di
		gd += gi * di
	}
	if beta == 0 || gd >= 0 {
		if gd >= 0 {
			floats.ScaleTo(m.d, -1, r.g)
		}
		gd = -gg1
		m.since = 0
	}
	m.gd = gd
	return running
}
