package optim

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// oneBatch presents a plain Objective as a Batched objective of one batch
// of share 1.
type oneBatch struct{ Objective }

func (oneBatch) Batches() int { return 1 }
func (o oneBatch) EvalBatch(grad, x []float64, _ int) float64 {
	return o.Eval(grad, x)
}
func (oneBatch) Share(int) float64 { return 1 }
func (oneBatch) Shuffle(uint64)    {}

var _ Batched = oneBatch{}

func asBatched(f Objective) Batched {
	if b, ok := f.(Batched); ok {
		return b
	}
	return oneBatch{f}
}

// epochSeed derives the shuffle seed of epoch e from seed with the
// SplitMix64 finaliser (Steele, Lea & Flood 2014) applied to
// seed + (e+1)·0x9E3779B97F4A7C15.
func epochSeed(seed uint64, e int) uint64 {
	z := seed + uint64(e+1)*0x9E3779B97F4A7C15
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9
	z = (z ^ (z >> 27)) * 0x94D049BB133111EB
	return z ^ (z >> 31)
}

// epoch is the part shared by Momentum and Adam: the batched objective, the
// sums that make the epoch's Step, and the point at the start of the epoch.
type epoch struct {
	b     Batched
	sumG  []float64 // Σ_k Share(k)·∇f_k over the epoch
	start []float64 // x at the start of the epoch
	cost  float64   // Σ_k Share(k)·f_k
	share float64   // Σ_k Share(k)
}

func (e *epoch) init(r *runner) error {
	e.b = asBatched(r.obj)
	if e.b.Batches() < 1 {
		return settingError("Batched", "Batches()", e.b.Batches(), "≥ 1")
	}
	n := len(r.x)
	e.sumG, e.start = grow(e.sumG, n), grow(e.start, n)
	r.keepLast = true
	return nil
}

// begin shuffles the rows for epoch r.iter and resets the sums.
func (e *epoch) begin(r *runner, seed uint64) {
	e.b.Shuffle(epochSeed(seed, r.iter))
	copy(e.start, r.x)
	clear(e.sumG)
	r.atStart = r.iter == 0 // the first batch is evaluated at x0
	e.cost, e.share = 0, 0
}

// batch evaluates batch k at x into r.g and adds it to the sums.
func (e *epoch) batch(r *runner, x []float64, k int) Status {
	f, st := r.evalBatch(e.b, r.g, x, k)
	r.atStart = false
	if st != running {
		return st
	}
	w := e.b.Share(k)
	e.cost += w * f
	e.share += w
	floats.AddScaled(e.sumG, w, r.g)
	return running
}

// end sets the runner's step values for the finished epoch.
func (e *epoch) end(r *runner) {
	r.f = e.cost / e.share
	r.gnorm = floats.Norm(e.sumG, 2) / e.share
	r.stepLen = floats.Distance(r.x, e.start, 2)
}

// decayed returns the learning rate of epoch e (counted from 0),
//
//	η_e = rate/(1 + decay·e),
//
// the inverse-time decay (common practice); with decay > 0 it meets the
// conditions Σ η_e = ∞, Σ η_e² < ∞ of Robbins & Monro (1951).
func decayed(rate, decay float64, e int) float64 {
	return rate / (1 + decay*float64(e))
}

func checkRate(method string, rate, decay *float64, defRate float64) error {
	if *rate == 0 {
		*rate = defRate
	}
	if !(*rate > 0) || math.IsInf(*rate, 1) {
		return settingError(method, "Rate", *rate, "finite and > 0")
	}
	if !(*decay >= 0) || math.IsInf(*decay, 1) {
		return settingError(method, "Decay", *decay, "finite and ≥ 0")
	}
	return nil
}

func checkBeta(method, field string, beta *float64, def float64) error {
	if *beta == 0 {
		*beta = def
	}
	if !(*beta > 0 && *beta < 1) {
		return settingError(method, field, *beta, "in (0, 1)")
	}
	return nil
}

// Momentum is stochastic gradient descent with momentum over the batches of
// a Batched objective (a plain Objective is one batch of share 1). For each
// batch, with g = ∇f_k evaluated at the point p,
//
//	v ← β·v − η_e·g,   x ← x + v,
//
// where p = x for the heavy ball (Polyak 1964) and p = x + β·v for Nesterov
// momentum (Nesterov 1983, in the form of Sutskever et al. 2013). One
// iteration is one epoch e = 0, 1, …: Shuffle(seed_e) with seed_e derived
// from Seed and e by SplitMix64, then every batch in order. The learning
// rate decays by epoch as η_e = Rate/(1 + Decay·e). v starts at 0.
//
// The zero value is heavy ball with Rate 0.01, Beta 0.9, no decay, Seed 0.
// Beta cannot be 0, since 0 selects the default; a Beta of 1e-12 gives
// plain stochastic gradient descent up to rounding.
type Momentum struct {
	// Rate is the learning rate η > 0; 0 means 0.01.
	Rate float64
	// Beta is the momentum β in (0, 1); 0 means 0.9.
	Beta float64
	// Nesterov evaluates the gradient at the look-ahead point x + β·v.
	Nesterov bool
	// Decay ≥ 0 is the rate decay per epoch; 0 means none.
	Decay float64
	// Seed seeds the shuffles.
	Seed uint64

	ep     epoch
	v, ahd []float64
}

var _ Method = (*Momentum)(nil)

func (m *Momentum) init(r *runner) (Status, error) {
	if m == nil {
		return running, ErrNilMethod
	}
	if err := checkRate("Momentum", &m.Rate, &m.Decay, 0.01); err != nil {
		return running, err
	}
	if err := checkBeta("Momentum", "Beta", &m.Beta, 0.9); err != nil {
		return running, err
	}
	if err := m.ep.init(r); err != nil {
		return running, err
	}
	n := len(r.x)
	m.v, m.ahd = grow(m.v, n), grow(m.ahd, n)
	clear(m.v)
	return running, nil
}

func (m *Momentum) iterate(r *runner) Status {
	m.ep.begin(r, m.Seed)
	eta := decayed(m.Rate, m.Decay, r.iter)
	for k := range m.ep.b.Batches() {
		p := r.x
		if m.Nesterov {
			floats.AddScaledTo(m.ahd, r.x, m.Beta, m.v)
			p = m.ahd
		}
		if st := m.ep.batch(r, p, k); st != running {
			return st
		}
		for i, gi := range r.g {
			vi := m.Beta*m.v[i] - eta*gi
			m.v[i] = vi
			r.x[i] += vi
		}
	}
	m.ep.end(r)
	return running
}

// Adam is the method of Kingma & Ba (2015) over the batches of a Batched
// objective (a plain Objective is one batch of share 1). For each batch,
// at step t = 1, 2, … counted over all epochs, with g = ∇f_k(x):
//
//	m ← β₁·m + (1 − β₁)·g
//	v ← β₂·v + (1 − β₂)·g²                 (elementwise)
//	x ← x − η_e·(m/(1 − β₁ᵗ)) / (√(v/(1 − β₂ᵗ)) + ε)
//
// Epochs, shuffling and the decay η_e = Rate/(1 + Decay·e) are as for
// Momentum. The zero value uses the paper's settings: Rate 0.001,
// Beta1 0.9, Beta2 0.999, Epsilon 1e-8; no decay; Seed 0.
type Adam struct {
	Rate    float64 // learning rate η > 0; 0 means 0.001
	Beta1   float64 // in (0, 1); 0 means 0.9
	Beta2   float64 // in (0, 1); 0 means 0.999
	Epsilon float64 // > 0; 0 means 1e-8
	Decay   float64 // ≥ 0; 0 means none
	Seed    uint64  // seeds the shuffles

	ep     epoch
	m, v   []float64
	p1, p2 float64 // β₁ᵗ, β₂ᵗ
}

var _ Method = (*Adam)(nil)

func (m *Adam) init(r *runner) (Status, error) {
	if m == nil {
		return running, ErrNilMethod
	}
	if err := checkRate("Adam", &m.Rate, &m.Decay, 0.001); err != nil {
		return running, err
	}
	if err := checkBeta("Adam", "Beta1", &m.Beta1, 0.9); err != nil {
		return running, err
	}
	if err := checkBeta("Adam", "Beta2", &m.Beta2, 0.999); err != nil {
		return running, err
	}
	if m.Epsilon == 0 {
		m.Epsilon = 1e-8
	}
	if !(m.Epsilon > 0) || math.IsInf(m.Epsilon, 1) {
		return running, settingError("Adam", "Epsilon", m.Epsilon, "finite and > 0")
	}
	if err := m.ep.init(r); err != nil {
		return running, err
	}
	n := len(r.x)
	m.m, m.v = grow(m.m, n), grow(m.v, n)
	clear(m.m)
	clear(m.v)
	m.p1, m.p2 = 1, 1
	return running, nil
}

func (m *Adam) iterate(r *runner) Status {
	m.ep.begin(r, m.Seed)
	eta := decayed(m.Rate, m.Decay, r.iter)
	b1, b2, eps := m.Beta1, m.Beta2, m.Epsilon
	for k := range m.ep.b.Batches() {
		if st := m.ep.batch(r, r.x, k); st != running {
			return st
		}
		m.p1 *= b1
		m.p2 *= b2
		c1, c2 := 1/(1-m.p1), 1/(1-m.p2)
		for i, gi := range r.g {
			mi := b1*m.m[i] + (1-b1)*gi
			vi := b2*m.v[i] + (1-b2)*gi*gi
			m.m[i], m.v[i] = mi, vi
			r.x[i] -= eta * (mi * c1) / (math.Sqrt(vi*c2) + eps)
		}
	}
	m.ep.end(r)
	return running
}
