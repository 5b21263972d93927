package data

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/mat"
)

// Scaler centres and scales each feature column j:
//
//	x'_j = (x_j − Mean[j]) / Scale[j]
//
// Fitted by FitScaler, Mean is the column mean and Scale the sample
// standard deviation (divisor n − 1, as gonum's stat.MeanStdDev), or 1 for
// a constant column, which is then centred and left unscaled. Fit it on
// training rows only and apply the same Scaler to holdout and prediction
// rows. A Scaler is read-only after fitting and safe for concurrent use.
type Scaler struct {
	Mean  []float64 // per-feature centre, finite
	Scale []float64 // per-feature divisor, finite and > 0
}

// FitScaler fits a Scaler to the columns of x (rows × features). The
// warnings name constant columns by 0-based index; FitScalerNamed names
// them by feature name.
func FitScaler(x mat.Matrix) (s *Scaler, warnings []string) {
	return FitScalerNamed(x, nil)
}

// FitScalerNamed is FitScaler with column names for the warnings; names
// may be nil, else it must have one name per column.
//
// The mean is Σx/n and the variance the corrected two-pass form
// (Σd² − (Σd)²/n)/(n − 1) with d = x − mean (Chan, Golub and LeVeque,
// 1983), the formula gonum's stat.MeanVariance uses.
func FitScalerNamed(x mat.Matrix, names []string) (s *Scaler, warnings []string) {
	r, c := x.Dims()
	if names != nil && len(names) != c {
		panic(fmt.Sprintf("data: %d names for %d columns", len(names), c))
	}
	s = &Scaler{Mean: make([]float64, c), Scale: make([]float64, c)}
	col := make([]float64, r)
	for j := range c {
		mat.Col(col, j, x)
		mean, sd, constant := meanSD(col)
		s.Mean[j] = mean
		s.Scale[j] = sd
		if constant {
			s.Scale[j] = 1
			what := "feature index " + strconv.Itoa(j)
			if names != nil {
				what = fmt.Sprintf("feature %q (index %d)", names[j], j)
			}
			warnings = append(warnings, fmt.Sprintf("%s is constant (%.6g over %d rows): centred, not scaled", what, col[0], r))
		}
	}
	return s, warnings
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

// Transform writes the scaled x into dst. dst may be x itself (no other
// overlap is allowed); an empty dst is sized to x. A column count other
// than len(Mean), or a dst of another shape, panics.
func (s *Scaler) Transform(dst *mat.Dense, x mat.Matrix) {
	r, c := x.Dims()
	if c != len(s.Mean) || c != len(s.Scale) {
		panic(fmt.Sprintf("data: Transform of %d columns by a scaler of %d", c, len(s.Mean)))
	}
	if dst.IsEmpty() {
		dst.ReuseAs(r, c)
	} else if dr, dc := dst.Dims(); dr != r || dc != c {
		panic(mat.ErrShape)
	}
	if rv, ok := x.(mat.RawRowViewer); ok {
		for i := range r {
			s.TransformRow(dst.RawRowView(i), rv.RawRowView(i))
		}
		return
	}
	for i := range r {
		for j := range c {
			dst.Set(i, j, (x.At(i, j)-s.Mean[j])/s.Scale[j])
		}
	}
}

// TransformRow writes the scaled row x into dst, which may be x. It does not
// allocate. Lengths other than len(Mean) panic.
func (s *Scaler) TransformRow(dst, x []float64) {
	if len(x) != len(s.Mean) || len(dst) != len(x) || len(s.Scale) != len(s.Mean) {
		panic(fmt.Sprintf("data: TransformRow of %d values into %d by a scaler of %d", len(x), len(dst), len(s.Mean)))
	}
	for j, v := range x {
		dst[j] = (v - s.Mean[j]) / s.Scale[j]
	}
}
