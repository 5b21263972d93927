package optim

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// Defaults of the line-search constants.
const (
	defaultDecrease     = 1e-4  // c₁, Nocedal & Wright (2006) §3.1
	defaultCurvatureCG  = 0.1   // c₂ for nonlinear CG, Nocedal & Wright (2006) §3.1
	defaultCurvatureQN  = 0.9   // c₂ for quasi-Newton, Nocedal & Wright (2006) §3.1
	lineSearchMaxEvals  = 40    // evaluations per line search (common practice)
	extrapolateMinRatio = 1.1   // next trial ≥ α_i + 1.1(α_i − α_{i−1}) (common practice)
	extrapolateMaxRatio = 4     // next trial ≤ α_i + 4(α_i − α_{i−1}) (common practice)
	zoomMargin          = 0.01  // keep zoom trials 1% inside the bracket (common practice)
	resolvedRel         = 1e-8  // cost differences below 1e-8·|φ(0)| are poorly resolved (common practice: half the digits)
	noiseRel            = 1e-12 // costs within 1e-12·|φ(0)| are taken as equal up to rounding
)

// wolfe is the line search shared by ConjugateGradient and LBFGS. Along the
// direction d from x it looks for a step α > 0 with φ(α) = f(x + α·d) that
// meets the strong Wolfe conditions
//
//	φ(α) ≤ φ(0) + c₁·α·φ'(0)        (sufficient decrease)
//	|φ'(α)| ≤ c₂·|φ'(0)|            (curvature)
//
// with 0 < c₁ < c₂ < 1. It follows Nocedal & Wright (2006), algorithm 3.5
// (bracketing) and algorithm 3.6 (zoom), with trial steps from the minimiser
// of the cubic that interpolates φ and φ' at two steps (their eq. 3.59),
// kept inside safeguards; bisection when the cubic has no minimiser.
type wolfe struct {
	c1, c2 float64
}

// checkWolfe validates the constants, applying the defaults first.
func checkWolfe(method string, c1, c2 *float64, defC2 float64) error {
	if *c1 == 0 {
		*c1 = defaultDecrease
	}
	if *c2 == 0 {
		*c2 = defC2
	}
	if !(*c1 > 0 && *c1 < 1) {
		return settingError(method, "Decrease", *c1, "in (0, 1)")
	}
	if !(*c2 > *c1 && *c2 < 1) {
		return settingError(method, "Curvature", *c2, "in (Decrease, 1)")
	}
	return nil
}

// search returns a step α meeting the strong Wolfe conditions, the cost
// φ(α) and the slope φ'(α). On running, xt = x + α·d and gt = ∇f(xt).
// f0 = φ(0), d0 = φ'(0) < 0, a1 > 0 is the first trial step.
func (w wolfe) search(r *runner, x, d, xt, gt []float64, f0, d0, a1 float64) (a, fa, da float64, st Status) {
	aPrev, fPrev, dPrev := 0.0, f0, d0
	a = a1
	fTol := noiseRel * math.Abs(f0)
	for i := 0; i < lineSearchMaxEvals; i++ {
		fa, da, st = phi(r, x, d, xt, gt, a)
		if st != running {
			return a, fa, da, st
		}
		if !w.decrease(f0, d0, a, fa, da, fTol) || (i > 0 && fa > fPrev+fTol) {
			return w.zoom(r, x, d, xt, gt, f0, d0, fTol, aPrev, fPrev, dPrev, a, fa, da, lineSearchMaxEvals-1-i)
		}
		if math.Abs(da) <= -w.c2*d0 {
			return a, fa, da, running
		}
		if da >= 0 {
			return w.zoom(r, x, d, xt, gt, f0, d0, fTol, a, fa, da, aPrev, fPrev, dPrev, lineSearchMaxEvals-1-i)
		}
		// Still descending: extrapolate.
		lo := a + extrapolateMinRatio*(a-aPrev)
		hi := a + extrapolateMaxRatio*(a-aPrev)
		next := interpolate(aPrev, fPrev, dPrev, a, fa, da, f0)
		if !(next >= lo) || next > hi { // NaN, or outside [lo, hi]
			if next < lo {
				next = lo
			} else {
				next = hi
			}
		}
		aPrev, fPrev, dPrev = a, fa, da
		a = next
	}
	return a, fa, da, LineSearchFailed
}

// zoom narrows the bracket between lo and hi, where lo is the step of lowest
// cost met so far that gives sufficient decrease (Nocedal & Wright 2006,
// algorithm 3.6). If the evaluations run out it falls back on lo when lo > 0
// and φ(lo) < φ(0): a step that meets the sufficient-decrease condition
// only; otherwise the search fails.
func (w wolfe) zoom(r *runner, x, d, xt, gt []float64, f0, d0, fTol, lo, flo, dlo, hi, fhi, dhi float64, left int) (a, fa, da float64, st Status) {
	width := math.Abs(hi - lo)
	for k := 0; left > 0; k, left = k+1, left-1 {
		if math.Abs(hi-lo) <= 1e-15*math.Max(math.Abs(lo), math.Abs(hi)) {
			break
		}
		lower, upper := math.Min(lo, hi), math.Max(lo, hi)
		a = interpolate(lo, flo, dlo, hi, fhi, dhi, f0)
		if k%3 == 2 { // every third trial: bisect unless the bracket halved
			if upper-lower > width/2 {
				a = math.NaN()
			}
			width = upper - lower
		}
		margin := zoomMargin * (upper - lower)
		switch {
		case math.IsNaN(a):
			a = (lo + hi) / 2
		case a < lower+margin:
			a = lower + margin
		case a > upper-margin:
			a = upper - margin
		}
		fa, da, st = phi(r, x, d, xt, gt, a)
		if st != running {
			return a, fa, da, st
		}
		if !w.decrease(f0, d0, a, fa, da, fTol) || fa > flo+fTol {
			hi, fhi, dhi = a, fa, da
			continue
		}
		if math.Abs(da) <= -w.c2*d0 {
			return a, fa, da, running
		}
		if da*(hi-lo) >= 0 {
			hi, fhi, dhi = lo, flo, dlo
		}
		lo, flo, dlo = a, fa, da
	}
	if lo > 0 && flo < f0 {
		fa, da, st = phi(r, x, d, xt, gt, lo)
		return lo, fa, da, st
	}
	return a, fa, da, LineSearchFailed
}

// decrease is the sufficient-decrease test: the Armijo condition
// φ(α) ≤ φ(0) + c₁·α·φ'(0), or, where the costs differ by no more than
// their rounding (fTol), the approximate form of Hager & Zhang (2005):
// φ(α) ≤ φ(0) + fTol and φ'(α) ≤ (2c₁ − 1)·φ'(0), which is equivalent to
// the Armijo condition on a quadratic but reads only the slope.
func (w wolfe) decrease(f0, d0, a, fa, da, fTol float64) bool {
	return fa <= f0+w.c1*a*d0 || (fa <= f0+fTol && da <= (2*w.c1-1)*d0)
}

// interpolate returns the next trial step from two steps a and b: the
// minimiser of the interpolating cubic, or, when the costs differ by less
// than resolvedRel·|φ(0)| so that their difference is dominated by
// rounding, the secant step on the slopes alone.
func interpolate(a, fa, da, b, fb, db, f0 float64) float64 {
	if math.Abs(fa-fb) <= resolvedRel*math.Abs(f0) {
		return secant(a, da, b, db)
	}
	return cubicMin(a, fa, da, b, fb, db)
}

// secant returns the zero of the line through (a, da) and (b, db), the
// minimiser of the quadratic with slopes da at a and db at b: exact when φ
// is quadratic. NaN when da = db.
func secant(a, da, b, db float64) float64 {
	if da == db {
		return math.NaN()
	}
	return b - db*(b-a)/(db-da)
}

// phi evaluates φ(a) = f(x + a·d) and φ'(a) = ∇f(x + a·d)ᵀd, leaving the
// point in xt and the gradient in gt.
func phi(r *runner, x, d, xt, gt []float64, a float64) (fa, da float64, st Status) {
	floats.AddScaledTo(xt, x, a, d)
	fa, st = r.eval(gt, xt)
	if st != running {
		return fa, 0, st
	}
	return fa, floats.Dot(gt, d), running
}

// cubicMin returns the minimiser of the cubic that interpolates φ(a) = fa,
// φ'(a) = da, φ(b) = fb, φ'(b) = db (Nocedal & Wright 2006, eq. 3.59):
//
//	d₁ = φ'(a) + φ'(b) − 3(φ(a) − φ(b))/(a − b)
//	d₂ = sign(b − a)·√(d₁² − φ'(a)φ'(b))
//	α  = b − (b − a)·(φ'(b) + d₂ − d₁)/(φ'(b) − φ'(a) + 2d₂)
//
// It returns NaN when the cubic has no minimiser. On a quadratic φ it
// returns the exact minimiser.
func cubicMin(a, fa, da, b, fb, db float64) float64 {
	d1 := da + db - 3*(fa-fb)/(a-b)
	rad := d1*d1 - da*db
	if rad < 0 {
		return math.NaN()
	}
	d2 := math.Copysign(math.Sqrt(rad), b-a)
	den := db - da + 2*d2
	if den == 0 {
		return math.NaN()
	}
	return b - (b-a)*(db+d2-d1)/den
}
