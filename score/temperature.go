package score

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Output says how a row of logits becomes probabilities.
type Output int

const (
	// Softmax: pₖ = e^(zₖ)/Σⱼ e^(zⱼ) over the row. It is the zero value.
	Softmax Output = iota
	// Sigmoid: pₖ = 1/(1+e^(−zₖ)) for each unit on its own.
	Sigmoid
)

// String returns "softmax" or "sigmoid".
func (o Output) String() string {
	switch o {
	case Softmax:
		return "softmax"
	case Sigmoid:
		return "sigmoid"
	}
	return fmt.Sprintf("Output(%d)", int(o))
}

// The range searched for the temperature.
const (
	MinTemperature float64 = 0.01
	MaxTemperature float64 = 100
)

// Temperature is the result of FitTemperature.
type Temperature struct {
	T      float64 // the fitted temperature, in [MinTemperature, MaxTemperature]
	Before float64 // mean cross-entropy (nats) at T = 1
	After  float64 // mean cross-entropy (nats) at T
	// AtBound reports that the cross-entropy still falls beyond the
	// searched range, so T is MinTemperature or MaxTemperature: the
	// logits separate the rows perfectly (T → 0), or rank them no
	// better than chance (T → ∞).
	AtBound    bool
	Iterations int // Newton or bisection steps taken
}

// tempCost evaluates the mean cross-entropy f(β) of the logits z scaled
// by β = 1/T against the targets y, and its first two derivatives in β.
// Sums run over rows in order, so the result does not depend on
// scheduling.
type tempCost struct {
	z, y mat.Matrix
	out  Output
	row  []float64 // scratch: β·z of one row
}

func (c *tempCost) eval(beta float64) (f, g, h float64) {
	m, k := c.z.Dims()
	for i := 0; i < m; i++ {
		switch c.out {
		case Softmax:
			// −Σₖ yₖ ln softmax(βz)ₖ = s·LSE(βz) − β Σₖ yₖ zₖ, s = Σₖ yₖ;
			// d/dβ = s·E_p[z] − Σ yₖzₖ; d²/dβ² = s·Var_p(z).
			mx := math.Inf(-1)
			var s, yz float64
			for j := 0; j < k; j++ {
				zj := c.z.At(i, j)
				c.row[j] = beta * zj
				mx = math.Max(mx, c.row[j])
				s += c.y.At(i, j)
				yz += c.y.At(i, j) * zj
			}
			var sum float64
			for j := 0; j < k; j++ {
				sum += math.Exp(c.row[j] - mx)
			}
			lse := mx + math.Log(sum)
			var ez, ez2 float64
			for j := 0; j < k; j++ {
				pj := math.Exp(c.row[j] - lse)
				zj := c.z.At(i, j)
				ez += pj * zj
				ez2 += pj * zj * zj
			}
			f += s*lse - beta*yz
			g += s*ez - yz
			h += s * math.Max(0, ez2-ez*ez)
		case Sigmoid:
			// softplus(u) − y·u with u = βz; d/dβ = (σ(u) − y)·z;
			// d²/dβ² = σ(u)(1−σ(u))·z².
			for j := 0; j < k; j++ {
				zj, yj := c.z.At(i, j), c.y.At(i, j)
				u := beta * zj
				sp := math.Max(u, 0) + math.Log1p(math.Exp(-math.Abs(u)))
				sg := sigmoid(u)
				f += sp - yj*u
				g += (sg - yj) * zj
				h += sg * (1 - sg) * zj * zj
			}
		}
	}
	fm := float64(m)
	return f / fm, g / fm, h / fm
}

// sigmoid is 1/(1+e^(−u)), written so that neither branch overflows.
func sigmoid(u float64) float64 {
	if u >= 0 {
		return 1 / (1 + math.Exp(-u))
	}
	e := math.Exp(u)
	return e / (1 + e)
}

// FitTemperature fits the temperature scaling of Guo, Pleiss, Sun &
// Weinberger (2017, "On calibration of modern neural networks", ICML):
// the one scalar T > 0 that minimises the mean cross-entropy over the m
// rows of the logits z (m × K, the output pre-activations) against the
// targets y (m × K, one-hot for softmax, 0/1 per unit for sigmoid):
//
//	Softmax: f = (1/m) Σᵢ [ (Σₖ yᵢₖ)·LSEₖ(zᵢₖ/T) − Σₖ yᵢₖ zᵢₖ/T ]
//	Sigmoid: f = (1/m) Σᵢ Σₖ [ softplus(zᵢₖ/T) − yᵢₖ zᵢₖ/T ]
//
// both computed from the logits through log-sum-exp and softplus, so
// nothing saturates. In β = 1/T, f is convex: the second derivative f⁽²⁾(β) is the mean of
// (Σₖ yᵢₖ)·Var_p(zᵢ) (softmax) or of Σₖ σ(1−σ)zᵢₖ² (sigmoid), both ≥ 0.
// So the minimum is the root of the monotone f'(β), found by Newton's
// method safeguarded by bisection on a bracket (the "rtsafe" scheme of
// Press, Teukolsky, Vetterling & Flannery 1992, Numerical Recipes §9.4):
// a Newton step that leaves the bracket is replaced by the geometric
// midpoint. The bracket is T ∈ [MinTemperature, MaxTemperature]; when
// f' has one sign over all of it, T is the end where f is least and
// AtBound is set. The iteration starts at T = 1 and stops when the
// bracket or the step is below 1e-13 relative to β, or after 200 steps.
//
// Errors wrap ErrShape (sizes differ, no rows, or a softmax with fewer
// than 2 columns) or ErrValue (a non-finite logit or a target outside
// [0, 1], with row and column, both 1-based).
func FitTemperature(z, y mat.Matrix, out Output) (Temperature, error) {
	m, k := z.Dims()
	ym, yk := y.Dims()
	if m != ym || k != yk {
		return Temperature{}, fmt.Errorf("score: logits are %d×%d, targets %d×%d: %w", m, k, ym, yk, ErrShape)
	}
	if m == 0 || k == 0 || (out == Softmax && k < 2) {
		return Temperature{}, fmt.Errorf("score: %v over %d rows × %d columns: %w", out, m, k, ErrShape)
	}
	if out != Softmax && out != Sigmoid {
		return Temperature{}, fmt.Errorf("score: %v: %w", out, ErrValue)
	}
	for i := 0; i < m; i++ {
		for j := 0; j < k; j++ {
			if v := z.At(i, j); math.IsNaN(v) || math.IsInf(v, 0) {
				return Temperature{}, fmt.Errorf("score: row %d, column %d: logit %v is not finite: %w", i+1, j+1, v, ErrValue)
			}
			if v := y.At(i, j); !(v >= 0 && v <= 1) {
				return Temperature{}, fmt.Errorf("score: row %d, column %d: target %v is outside [0, 1]: %w", i+1, j+1, v, ErrValue)
			}
		}
	}
	c := &tempCost{z: z, y: y, out: out, row: make([]float64, k)}
	before, _, _ := c.eval(1)
	lo, hi := 1/MaxTemperature, 1/MinTemperature // bracket on β
	res := Temperature{Before: before}
	if _, g, _ := c.eval(lo); g >= 0 {
		res.T = MaxTemperature
		res.After, _, _ = c.eval(lo)
		res.AtBound = true
		return res, nil
	}
	if _, g, _ := c.eval(hi); g <= 0 {
		res.T = MinTemperature
		res.After, _, _ = c.eval(hi)
		res.AtBound = true
		return res, nil
	}
	beta := 1.0
	for res.Iterations < 200 {
		res.Iterations++
		_, g, h := c.eval(beta)
		if g == 0 {
			break
		}
		if g < 0 {
			lo = beta
		} else {
			hi = beta
		}
		next := math.Sqrt(lo * hi)
		if h > 0 {
			if nt := beta - g/h; nt > lo && nt < hi {
				next = nt
			}
		}
		step := math.Abs(next - beta)
		beta = next
		if step <= 1e-13*beta || hi-lo <= 1e-13*beta {
			break
		}
	}
	res.T = 1 / beta
	res.After, _, _ = c.eval(beta)
	return res, nil
}

// ApplyTemperature writes the scaled logits z/T into dst, which is sized
// to z when empty and must otherwise have z's shape. Each entry is
// divided by T, so T = 1 leaves the logits, and the probabilities made
// from them, bit-identical. Errors wrap ErrValue (T not finite and > 0)
// or ErrShape.
func ApplyTemperature(dst *mat.Dense, z mat.Matrix, t float64) error {
	if !(t > 0) || math.IsInf(t, 1) {
		return fmt.Errorf("score: temperature %v: want a finite T > 0: %w", t, ErrValue)
	}
	m, k := z.Dims()
	if err := shapeLike(dst, m, k); err != nil {
		return err
	}
	for i := 0; i < m; i++ {
		for j := 0; j < k; j++ {
			dst.Set(i, j, z.At(i, j)/t)
		}
	}
	return nil
}

// shapeLike sizes an empty dst to m×k, or checks that dst is m×k (the
// shape of the logits it is written from).
func shapeLike(dst *mat.Dense, m, k int) error {
	if dst.IsEmpty() {
		dst.ReuseAs(m, k)
	} else if dm, dk := dst.Dims(); dm != m || dk != k {
		return fmt.Errorf("score: destination is %d×%d, logits %d×%d: %w", dm, dk, m, k, ErrShape)
	}
	return nil
}

// Probabilities writes into dst (sized to z when empty, else of z's
// shape) the probabilities made from the logits z by out: a softmax over
// each row, pₖ = e^(zₖ−max)/Σⱼ e^(zⱼ−max), or a sigmoid per unit.
// Errors wrap ErrShape or ErrValue (an unknown Output).
func Probabilities(dst *mat.Dense, z mat.Matrix, out Output) error {
	if out != Softmax && out != Sigmoid {
		return fmt.Errorf("score: %v: %w", out, ErrValue)
	}
	m, k := z.Dims()
	if err := shapeLike(dst, m, k); err != nil {
		return err
	}
	for i := 0; i < m; i++ {
		if out == Sigmoid {
			for j := 0; j < k; j++ {
				dst.Set(i, j, sigmoid(z.At(i, j)))
			}
			continue
		}
		mx := math.Inf(-1)
		for j := 0; j < k; j++ {
			mx = math.Max(mx, z.At(i, j))
		}
		var sum float64
		for j := 0; j < k; j++ {
			e := math.Exp(z.At(i, j) - mx)
			dst.Set(i, j, e)
			sum += e
		}
		for j := 0; j < k; j++ {
			dst.Set(i, j, dst.At(i, j)/sum)
		}
	}
	return nil
}
