package encode

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/mat"
)

// fitScale returns the mean and the scale of each column of x (rows ×
// columns) that standardise it, x'_j = (x_j − mean_j) / scale_j: the
// column mean and the sample standard deviation (divisor n − 1, as gonum's
// stat.MeanStdDev), or 1 for a constant column, which is then centred,
// left unscaled and named in the warnings (by names[j], or by index when
// names is nil).
//
// The mean is Σx/n and the variance the corrected two-pass form
// (Σd² − (Σd)²/n)/(n − 1) with d = x − mean (Chan, Golub and LeVeque,
// 1983), the formula gonum's stat.MeanVariance uses.
func fitScale(x mat.Matrix, names []string) (mean, scale []float64, warnings []string) {
	r, c := x.Dims()
	if names != nil && len(names) != c {
		panic(fmt.Sprintf("encode: %d names for %d columns", len(names), c))
	}
	mean, scale = make([]float64, c), make([]float64, c)
	col := make([]float64, r)
	for j := range c {
		mat.Col(col, j, x)
		m, sd, constant := meanSD(col)
		mean[j], scale[j] = m, sd
		if constant {
			scale[j] = 1
			what := "feature index " + strconv.Itoa(j)
			if names != nil {
				what = fmt.Sprintf("feature %q (index %d)", names[j], j)
			}
			warnings = append(warnings, fmt.Sprintf("%s is constant (%.6g over %d rows): centred, not scaled", what, col[0], r))
		}
	}
	return mean, scale, warnings
}

// meanSD returns the mean and sample standard deviation of v, and whether
// v is constant (all values equal, or fewer than two, or a spread that
// does not register in float64). It cannot overflow for finite values:
// when the largest magnitude M is beyond 1e150 it works on v/M (exact up to
// rounding, every term in [−1, 1]) and scales the results back, and a
// standard deviation beyond the float64 range is capped at its largest
// value, which still scales every finite value to a finite one.
func meanSD(v []float64) (mean, sd float64, constant bool) {
	constant = true
	var big float64
	for _, a := range v {
		if a != v[0] {
			constant = false
		}
		big = max(big, math.Abs(a))
	}
	scale := 1.0
	if big > 1e150 {
		scale = big
	}
	n := float64(len(v))
	for _, a := range v {
		mean += a / scale
	}
	mean /= n
	if constant || len(v) < 2 {
		return mean * scale, 1, true
	}
	var ss, comp float64
	for _, a := range v {
		d := a/scale - mean
		ss += d * d
		comp += d
	}
	sd = math.Sqrt((ss - comp*comp/n) / (n - 1))
	if !(sd >= 1e-150) && scale == 1 { // squares may have underflowed: scale by the largest deviation
		var m float64
		for _, a := range v {
			m = max(m, math.Abs(a-mean))
		}
		ss = 0
		for _, a := range v {
			d := (a - mean) / m
			ss += d * d
		}
		sd = m * math.Sqrt(ss/(n-1))
	}
	mean *= scale
	sd *= scale
	if math.IsInf(sd, 1) {
		sd = math.MaxFloat64
	}
	if !(sd > 0) {
		return mean, 1, true
	}
	return mean, sd, false
}
