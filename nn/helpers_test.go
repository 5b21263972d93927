package nn

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/spec"
)

// outKind is one of the three output kinds of a net.
type outKind int

const (
	outSoftmax outKind = iota // softmax over 3 classes
	outMulti                  // sigmoid multi-label, 3 units
	outBinary                 // sigmoid, 2 classes, 1 unit
)

func (k outKind) String() string { return [...]string{"softmax", "multilabel", "binary"}[k] }

func classNames(k int) []string {
	c := make([]string, k)
	for i := range c {
		c[i] = strconv.Itoa(i)
	}
	return c
}

// testSpec returns a net description with the given widths of hidden layers.
func testSpec(inputs int, hidden []int, g spec.Activation, k outKind) *spec.Network {
	s := &spec.Network{Version: 1, Inputs: inputs, Init: spec.Init{Scheme: spec.GlorotUniform, Seed: 1}}
	for _, u := range hidden {
		s.Hidden = append(s.Hidden, spec.Layer{Units: u, Activation: g})
	}
	switch k {
	case outSoftmax:
		s.Output = spec.Output{Classes: classNames(3), Activation: spec.Softmax}
	case outMulti:
		s.Output = spec.Output{Classes: classNames(3), Activation: spec.Sigmoid, Multilabel: true}
	case outBinary:
		s.Output = spec.Output{Classes: classNames(2), Activation: spec.Sigmoid}
	}
	return s
}

func mustCompile(t testing.TB, s *spec.Network) *Net {
	t.Helper()
	n, err := Compile(s)
	require.NoError(t, err)
	return n
}

// testData returns m rows of features in [−1, 1) and targets fitting the
// output kind: one-hot rows for softmax and binary, random 0/1 for
// multi-label (and for softmax when multiHot).
func testData(rng *rand.Rand, m, inputs int, k outKind, multiHot bool) (x, y *mat.Dense) {
	x = mat.NewDense(m, inputs, nil)
	for i := 0; i < m; i++ {
		for j := 0; j < inputs; j++ {
			x.Set(i, j, 2*rng.Float64()-1)
		}
	}
	classes := 3
	if k == outBinary {
		classes = 2
	}
	y = mat.NewDense(m, classes, nil)
	for i := 0; i < m; i++ {
		if k == outMulti || multiHot {
			for j := 0; j < classes; j++ {
				y.Set(i, j, float64(rng.IntN(2)))
			}
		} else {
			y.Set(i, rng.IntN(classes), 1)
		}
	}
	return x, y
}

// awayFromZero returns n values with |v| in [0.1, 1), random signs, so that
// an L1 term is differentiable within any finite-difference stencil.
func awayFromZero(rng *rand.Rand, n int) []float64 {
	p := make([]float64, n)
	for i := range p {
		v := 0.1 + 0.9*rng.Float64()
		if rng.IntN(2) == 0 {
			v = -v
		}
		p[i] = v
	}
	return p
}

// maxAbs returns ‖v‖∞.
func maxAbs(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	return m
}

// relErr returns ‖g − ref‖∞ / max(floor, ‖ref‖∞).
func relErr(g, ref []float64, floor float64) float64 {
	d := 0.0
	for i := range g {
		d = math.Max(d, math.Abs(g[i]-ref[i]))
	}
	return d / math.Max(floor, maxAbs(ref))
}

// oneHot returns m one-hot rows over k classes.
func oneHot(rng *rand.Rand, m, k int) *mat.Dense {
	y := mat.NewDense(m, k, nil)
	for i := 0; i < m; i++ {
		y.Set(i, rng.IntN(k), 1)
	}
	return y
}
