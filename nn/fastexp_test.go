package nn

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
)

// ulps returns |got − want| in units of the last place of want.
func ulps(got, want float64) float64 {
	if got == want || (math.IsNaN(got) && math.IsNaN(want)) {
		return 0
	}
	u := math.Nextafter(math.Abs(want), math.Inf(1)) - math.Abs(want)
	return math.Abs(got-want) / u
}

// TestExpNegTo: expNegTo is within 3 ulp of math.Exp on [−745, 0], exact
// at 0, and follows math.Exp below −708, at −Inf and for NaN.
func TestExpNegTo(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	xs := []float64{0, math.Copysign(0, -1), -1e-300, -1e-17, -0.5 * math.Ln2, -math.Ln2, -1, -707.9, -708, -708.1, -744, -745.2, math.Inf(-1), math.NaN()}
	for range 200000 {
		xs = append(xs, -rng.Float64()*20, -rng.Float64()*750, -math.Exp(-40*rng.Float64()))
	}
	got := make([]float64, len(xs))
	expNegTo(got, xs)
	worst := 0.0
	for i, x := range xs {
		want := math.Exp(x)
		if u := ulps(got[i], want); u > worst || math.IsNaN(u) {
			worst = u
			assert.LessOrEqual(t, u, 3.0, "expNegTo(%v) = %v, math.Exp %v: %.1f ulp", x, got[i], want, u)
		}
	}
	t.Logf("worst difference from math.Exp: %.2f ulp", worst)
}

// TestActivationsTo: sigmoidTo and tanhTo are within 4 ulp of sigmoid
// and math.Tanh, keep the sign of zero's result, and saturate at ±Inf
// without NaN; NaN stays NaN.
func TestActivationsTo(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 2))
	zs := []float64{0, math.Copysign(0, -1), 1e-300, -1e-300, 0.55, -0.55, 0.5499999, 20, -20, 40, -40, 710, -710, 800, -800, math.Inf(1), math.Inf(-1), math.NaN()}
	for range 200000 {
		zs = append(zs, rng.NormFloat64()*3, rng.NormFloat64()*30, rng.Float64()-0.5)
	}
	s := make([]float64, len(zs))
	th := make([]float64, len(zs))
	sigmoidTo(s, zs)
	tanhTo(th, zs)
	worstS, worstT := 0.0, 0.0
	for i, z := range zs {
		if u := ulps(s[i], sigmoid(z)); u > worstS || math.IsNaN(u) {
			worstS = u
			assert.LessOrEqual(t, u, 4.0, "sigmoidTo(%v) = %v, want %v: %.1f ulp", z, s[i], sigmoid(z), u)
		}
		if u := ulps(th[i], math.Tanh(z)); u > worstT || math.IsNaN(u) {
			worstT = u
			assert.LessOrEqual(t, u, 4.0, "tanhTo(%v) = %v, want %v: %.1f ulp", z, th[i], math.Tanh(z), u)
		}
	}
	t.Logf("worst differences: sigmoid %.2f ulp, tanh %.2f ulp", worstS, worstT)
	// ulps counts +0 and −0 as equal, so the sign of zero is checked on
	// its own: tanh is odd, tanh(−0) = −0 (IEEE 754 and math.Tanh).
	assert.True(t, math.Signbit(th[1]), "tanhTo(-0) = %v, want -0", th[1])
	assert.False(t, math.Signbit(th[0]), "tanhTo(+0) = %v, want +0", th[0])
}
