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

// point is a trial step of the line search with what is known there:
// the step α, the cost φ(α) and the slope φ'(α).
type point struct {
	alpha, f, dphi float64
}

// line is the one-dimensional problem φ(α) = f(x + α·d) of one search:
// where it starts, where trial points and their gradients are written, and
// φ(0), φ'(0) and the tolerance within which two costs count as equal.
type line struct {
	r            *runner
	x, d, xt, gt []float64
	f0, d0       float64 // φ(0), φ'(0) < 0
	fTol         float64 // noiseRel·|φ(0)|
}

// search returns a step α meeting the strong Wolfe conditions with φ(α)
// and φ'(α). On running, xt = x + α·d and gt = ∇f(xt).
// f0 = φ(0), d0 = φ'(0) < 0, a1 > 0 is the first trial step.
func (w wolfe) search(r *runner, x, d, xt, gt []float64, f0, d0, a1 float64) (point, Status) {
	l := line{r: r, x: x, d: d, xt: xt, gt: gt, f0: f0, d0: d0, fTol: noiseRel * math.Abs(f0)}
	prev := point{0, f0, d0}
	a := a1
	for i := 0; i < lineSearchMaxEvals; i++ {
		p, st := l.at(a)
		if st != running {
			return p, st
		}
		if !w.decrease(&l, p) || (i > 0 && p.f > prev.f+l.fTol) {
			return w.zoom(&l, prev, p, lineSearchMaxEvals-1-i)
		}
		if math.Abs(p.dphi) <= -w.c2*d0 {
			return p, running
		}
		if p.dphi >= 0 {
			return w.zoom(&l, p, prev, lineSearchMaxEvals-1-i)
		}
		// Still descending: extrapolate.
		lo := a + extrapolateMinRatio*(a-prev.alpha)
		hi := a + extrapolateMaxRatio*(a-prev.alpha)
		next := interpolate(prev, p, f0)
		if !(next >= lo) || next > hi { // NaN, or outside [lo, hi]
			if next < lo {
				next = lo
			} else {
				next = hi
			}
		}
		prev = p
		a = next
	}
	return point{a, math.NaN(), math.NaN()}, LineSearchFailed
}

// zoom narrows the bracket between lo and hi, where lo is the point of
// lowest cost met so far that gives sufficient decrease (Nocedal & Wright
// 2006, algorithm 3.6), with at most left evaluations. If they run out it
// falls back on lo when lo.alpha > 0 and φ(lo) < φ(0): a step that meets
// the sufficient-decrease condition only; otherwise the search fails.
func (w wolfe) zoom(l *line, lo, hi point, left int) (point, Status) {
	width := math.Abs(hi.alpha - lo.alpha)
	var p point
	var st Status
	for k := 0; left > 0; k, left = k+1, left-1 {
		if math.Abs(hi.alpha-lo.alpha) <= 1e-15*math.Max(math.Abs(lo.alpha), math.Abs(hi.alpha)) {
			break
		}
		lower, upper := math.Min(lo.alpha, hi.alpha), math.Max(lo.alpha, hi.alpha)
		a := interpolate(lo, hi, l.f0)
		if k%3 == 2 { // every third trial: bisect unless the bracket halved
			if upper-lower > width/2 {
				a = math.NaN()
			}
			width = upper - lower
		}
		margin := zoomMargin * (upper - lower)
		switch {
		case math.IsNaN(a):
			a = (lo.alpha + hi.alpha) / 2
		case a < lower+margin:
			a = lower + margin
		case a > upper-margin:
			a = upper - margin
		}
		if p, st = l.at(a); st != running {
			return p, st
		}
		if !w.decrease(l, p) || p.f > lo.f+l.fTol {
			hi = p
			continue
		}
		if math.Abs(p.dphi) <= -w.c2*l.d0 {
			return p, running
		}
		if p.dphi*(hi.alpha-lo.alpha) >= 0 {
			hi = lo
		}
		lo = p
	}
	if lo.alpha > 0 && lo.f < l.f0 {
		return l.at(lo.alpha)
	}
	return p, LineSearchFailed
}

// decrease is the sufficient-decrease test: the Armijo condition
// φ(α) ≤ φ(0) + c₁·α·φ'(0), or, where the costs differ by no more than
// their rounding (fTol), the approximate form of Hager & Zhang (2005):
// φ(α) ≤ φ(0) + fTol and φ'(α) ≤ (2c₁ − 1)·φ'(0), which is equivalent to
// the Armijo condition on a quadratic but reads only the slope.
func (w wolfe) decrease(l *line, p point) bool {
	return p.f <= l.f0+w.c1*p.alpha*l.d0 || (p.f <= l.f0+l.fTol && p.dphi <= (2*w.c1-1)*l.d0)
}

// interpolate returns the next trial step from two points p and q: the
// minimiser of the interpolating cubic, or, when the costs differ by less
// than resolvedRel·|φ(0)| so that their difference is dominated by
// rounding, the secant step on the slopes alone.
func interpolate(p, q point, f0 float64) float64 {
	if math.Abs(p.f-q.f) <= resolvedRel*math.Abs(f0) {
		return secant(p.alpha, p.dphi, q.alpha, q.dphi)
	}
	return cubicMin(p.alpha, p.f, p.dphi, q.alpha, q.f, q.dphi)
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

// at evaluates φ(a) = f(x + a·d) and φ'(a) = ∇f(x + a·d)ᵀd, leaving the
// point in xt and the gradient in gt.
func (l *line) at(a float64) (point, Status) {
	floats.AddScaledTo(l.xt, l.x, a, l.d)
	f, st := l.r.eval(l.gt, l.xt)
	if st != running {
		return point{a, f, 0}, st
	}
	return point{a, f, floats.Dot(l.gt, l.d)}, running
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
