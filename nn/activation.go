package nn

import (
	"math"

	"github.com/seine-ml/seine/spec"
)

// leakySlope is the slope of leaky-relu for z ≤ 0 (fixed by the spec).
const leakySlope = 0.01

// sigmoid returns σ(z) = 1/(1+e^(−z)) without overflow for any z.
func sigmoid(z float64) float64 {
	if z >= 0 {
		return 1 / (1 + math.Exp(-z))
	}
	e := math.Exp(z)
	return e / (1 + e)
}

// softplus returns ln(1+e^z) = max(z, 0) + ln(1+e^(−|z|)), finite for every
// finite z.
func softplus(z float64) float64 {
	return math.Max(z, 0) + math.Log1p(math.Exp(-math.Abs(z)))
}

// activate sets a[i] = g(z[i]).
func activate(g spec.Activation, a, z []float64) {
	a = a[:len(z)]
	switch g {
	case spec.Sigmoid:
		sigmoidTo(a, z)
	case spec.Tanh:
		tanhTo(a, z)
	case spec.ReLU:
		for i, v := range z {
			a[i] = math.Max(v, 0)
		}
	case spec.LeakyReLU:
		for i, v := range z {
			if v > 0 {
				a[i] = v
			} else {
				a[i] = leakySlope * v
			}
		}
	case spec.Softplus:
		for i, v := range z {
			a[i] = softplus(v)
		}
	case spec.Identity:
		copy(a, z)
	default:
		panic("nn: unexpected hidden activation " + g.String())
	}
}

// mulDerivative sets d[i] *= g′(z[i]), where a[i] = g(z[i]):
//
//	sigmoid: σ′ = a(1−a)        tanh: 1 − a²
//	relu: 1 if z > 0 else 0     leaky-relu: 1 if z > 0 else 0.01
//	softplus: σ(z)              identity: 1
//
// At the kink z = 0 relu and leaky-relu use the left derivative.
func mulDerivative(g spec.Activation, d, z, a []float64) {
	z = z[:len(d)]
	a = a[:len(d)]
	switch g {
	case spec.Sigmoid:
		for i, v := range a {
			d[i] *= v * (1 - v)
		}
	case spec.Tanh:
		for i, v := range a {
			d[i] *= 1 - v*v
		}
	case spec.ReLU:
		for i, v := range z {
			if v <= 0 {
				d[i] = 0
			}
		}
	case spec.LeakyReLU:
		for i, v := range z {
			if v <= 0 {
				d[i] *= leakySlope
			}
		}
	case spec.Softplus:
		for i, v := range z {
			d[i] *= sigmoid(v)
		}
	case spec.Identity:
	default:
		panic("nn: unexpected hidden activation " + g.String())
	}
}
