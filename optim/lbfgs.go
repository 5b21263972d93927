package optim

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// LBFGS is the limited-memory BFGS method (Nocedal 1980; Liu & Nocedal
// 1989). It keeps the last Memory pairs s_i = x_{i+1} − x_i,
// y_i = ∇f(x_{i+1}) − ∇f(x_i) and forms d_k = −H_k·∇f(x_k) by the
// two-loop recursion (Nocedal & Wright 2006, algorithm 7.4), with the
// initial matrix H⁰_k = γ_k·I, γ_k = s_{k−1}ᵀy_{k−1} / y_{k−1}ᵀy_{k−1}
// (their eq. 7.20). A pair with sᵀy ≤ 0 (non-positive curvature) is not
// stored. The step α_k comes from the strong Wolfe line search; the first
// trial step is 1, except 1/‖g‖₂ when the memory is empty. If d_k is not a
// descent direction the memory is cleared and d_k = −∇f(x_k).
//
// The zero value keeps 10 pairs with c₁ = 1e-4 and c₂ = 0.9. Its own
// workspace holds 2·Memory + 3 vectors of length n (see StateVectors).
type LBFGS struct {
	// Memory is the number of stored pairs, ≥ 1; 0 means 10.
	Memory int
	// Decrease is c₁ of the strong Wolfe conditions, in (0, 1); 0 means 1e-4.
	Decrease float64
	// Curvature is c₂ of the strong Wolfe conditions, in (Decrease, 1);
	// 0 means 0.9.
	Curvature float64

	s, y      [][]float64
	rho, a    []float64
	d, xt, gt []float64
	head      int // index of the slot for the next pair
	count     int // stored pairs
	gamma     float64
}

var _ Method = (*LBFGS)(nil)

const defaultMemory = 10

func (m *LBFGS) init(r *runner) (Status, error) {
	if m == nil {
		return running, ErrNilMethod
	}
	if m.Memory < 0 {
		return running, settingError("LBFGS", "Memory", m.Memory, "≥ 0")
	}
	if m.Memory == 0 {
		m.Memory = defaultMemory
	}
	if err := checkWolfe("LBFGS", &m.Decrease, &m.Curvature, defaultCurvatureQN); err != nil {
		return running, err
	}
	n, mem := len(r.x), m.Memory
	if len(m.s) != mem || len(m.s[0]) != n {
		flat := make([]float64, 2*mem*n)
		m.s, m.y = make([][]float64, mem), make([][]float64, mem)
		for i := range mem {
			m.s[i] = flat[2*i*n : (2*i+1)*n : (2*i+1)*n]
			m.y[i] = flat[(2*i+1)*n : (2*i+2)*n : (2*i+2)*n]
		}
		m.rho, m.a = make([]float64, mem), make([]float64, mem)
	}
	m.d, m.xt, m.gt = grow(m.d, n), grow(m.xt, n), grow(m.gt, n)
	m.head, m.count, m.gamma = 0, 0, 1
	return r.evalStart(), nil
}

// direction sets m.d = −H·g by the two-loop recursion and returns gᵀd.
func (m *LBFGS) direction(g []float64) float64 {
	mem := m.Memory
	copy(m.d, g)
	for j := 1; j <= m.count; j++ { // newest to oldest
		i := (m.head - j + mem) % mem
		m.a[i] = m.rho[i] * floats.Dot(m.s[i], m.d)
		floats.AddScaled(m.d, -m.a[i], m.y[i])
	}
	floats.Scale(m.gamma, m.d)
	for j := m.count; j >= 1; j-- { // oldest to newest
		i := (m.head - j + mem) % mem
		b := m.rho[i] * floats.Dot(m.y[i], m.d)
		floats.AddScaled(m.d, m.a[i]-b, m.s[i])
	}
	floats.Scale(-1, m.d)
	return floats.Dot(g, m.d)
}

func (m *LBFGS) iterate(r *runner) Status {
	gd := m.direction(r.g)
	if !(gd < 0) {
		m.count, m.gamma = 0, 1
		floats.ScaleTo(m.d, -1, r.g)
		gd = -r.gnorm * r.gnorm
	}
	a0 := 1.0
	if m.count == 0 {
		a0 = 1 / floats.Norm(m.d, 2)
	}
	p, st := wolfe{m.Decrease, m.Curvature}.search(r, r.x, m.d, m.xt, m.gt, r.f, gd, a0)
	if st != running {
		return st
	}
	a, fa := p.alpha, p.f
	// New pair: s = a·d, y = g₊ − g.
	s, y := m.s[m.head], m.y[m.head]
	var sy, yy, ss float64
	for i := range s {
		si := a * m.d[i]
		yi := m.gt[i] - r.g[i]
		s[i], y[i] = si, yi
		sy += si * yi
		yy += yi * yi
		ss += si * si
	}
	if sy > 0 {
		m.rho[m.head] = 1 / sy
		m.gamma = sy / yy
		m.head = (m.head + 1) % m.Memory
		m.count = min(m.count+1, m.Memory)
	}
	r.stepLen = math.Sqrt(ss)
	r.x, m.xt = m.xt, r.x
	r.g, m.gt = m.gt, r.g
	r.f = fa
	r.gnorm = floats.Norm(r.g, 2)
	return running
}
