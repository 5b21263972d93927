package nn

import (
	"math"
	"math/rand/v2"

	"github.com/seine-ml/seine/spec"
)

// initStream is the PCG stream constant of Init; with the seed it fixes the
// whole draw.
const initStream = 0x5e1e_0001

// Init fills dst (length NumParams) with initial params drawn from the spec's
// scheme, deterministically from seed alone. Every weight of W_l is drawn
// independently from U(−r, r) with
//
//	glorot-uniform: r = √(6/(n_l + n_{l+1}))   (Glorot & Bengio 2010)
//	he-uniform:     r = √(6/n_l)               (He et al. 2015)
//	uniform:        r = Init.Scale
//
// where n_l is the fan-in and n_{l+1} the fan-out of the layer. Weights are
// drawn layer by layer, input side first, each matrix in row-major order.
// Biases are set to 0: the random weights already break the symmetry
// between units.
func (n *Net) Init(dst []float64, seed uint64) {
	n.checkParams(dst)
	rng := rand.New(rand.NewPCG(seed, initStream))
	for l := 0; l < n.NumLayers(); l++ {
		r := n.initBound(l)
		w := n.weights(dst, l).Data
		for i := range w {
			w[i] = (2*rng.Float64() - 1) * r
		}
		clear(dst[n.bOff[l] : n.bOff[l]+n.sizes[l+1]])
	}
}

// initBound returns the half-width r of layer l's initial weights.
func (n *Net) initBound(l int) float64 {
	in, out := float64(n.sizes[l]), float64(n.sizes[l+1])
	switch n.spec.Init.Scheme {
	case spec.HeUniform:
		return math.Sqrt(6 / in)
	case spec.Uniform:
		return n.spec.Init.Scale
	default: // spec.GlorotUniform; Compile rejects anything else
		return math.Sqrt(6 / (in + out))
	}
}

// NewParams returns a new params vector initialised by Init with the spec's
// seed (Init.Seed).
func (n *Net) NewParams() []float64 {
	p := make([]float64, n.np)
	n.Init(p, n.spec.Init.Seed)
	return p
}
