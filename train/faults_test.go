package train

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"runtime"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
)

// faultSpec is a 2-input net with one tanh layer of 4 and softmax over 2
// classes; l2 0.1 unless changed.
const faultSpec = `
version: 1
inputs: 2
hidden:
  - units: 4
    activation: tanh
output:
  classes: [a, b]
penalty:
  l2: 0.1
init:
  seed: 3
train:
  iterations: 50
`

// twoBlobs returns n rows of two features: class a around (−1, −1), class
// b around (1, 1), with noise, all multiplied by scale.
func twoBlobs(n int, scale float64, seed uint64) *data.Set {
	rng := rand.New(rand.NewPCG(seed, seed))
	x := mat.NewDense(n, 2, nil)
	y := mat.NewDense(n, 2, nil)
	for i := range n {
		c := i % 2
		s := float64(2*c - 1)
		x.Set(i, 0, scale*(s+0.5*rng.NormFloat64()))
		x.Set(i, 1, scale*(s+0.5*rng.NormFloat64()))
		y.Set(i, c, 1)
	}
	return &data.Set{X: x, Y: y, Classes: []string{"a", "b"}, Features: []string{"f0", "f1"}}
}

// requireSound checks a model built by Train: finite params, a finite
// training cost, and on every training row finite probabilities that sum
// to 1 within 1e-12 (two roundings of numbers ≤ 1).
func requireSound(t *testing.T, m *nn.Model, set *data.Set) {
	t.Helper()
	require.NotNil(t, m)
	for i, v := range m.Params() {
		require.False(t, math.IsNaN(v) || math.IsInf(v, 0), "param %d is %v", i, v)
	}
	require.False(t, math.IsNaN(m.Summary().Cost) || math.IsInf(m.Summary().Cost, 0), "training cost %v", m.Summary().Cost)
	for i := range set.Rows() {
		p := m.Probabilities(nil, set.X.RawRowView(i))
		sum := 0.0
		for k, v := range p {
			require.True(t, v >= 0 && v <= 1, "row %d class %d: probability %v", i, k, v)
			sum += v
		}
		require.InDelta(t, 1, sum, 1e-12, "row %d", i)
	}
}

// Features of 10³⁰⁰ and 10⁻³⁰⁰ train like features near 1 once
// standardised: the scaler's mean and deviation stay finite (the
// term-by-term mean avoids the overflow of the sum), and the model
// answers on the raw rows. Without standardisation the run may stop
// early, but any model it returns is finite.
func TestFaultExtremeFeatures(t *testing.T) {
	s := parseSpec(t, faultSpec)
	for _, scale := range []float64{1e300, 1e-300} {
		set := twoBlobs(60, scale, 1)
		res, err := Train(context.Background(), s, set, Options{})
		require.NoError(t, err, "scale %g", scale)
		requireSound(t, res.Model, set)
		// The blobs are separable up to a few noisy rows: at least 0.9.
		assert.GreaterOrEqual(t, res.Model.Summary().TrainAccuracy, 0.9, "scale %g", scale)

		raw, err := Train(context.Background(), s, set, Options{NoScale: true})
		if err != nil {
			t.Logf("scale %g without scaling: %v", scale, err)
			assert.NotEmpty(t, err.Error())
		}
		if raw != nil && raw.Model != nil {
			for i, v := range raw.Model.Params() {
				require.False(t, math.IsNaN(v) || math.IsInf(v, 0), "scale %g unscaled: param %d is %v", scale, i, v)
			}
		}
	}
}

// A saturated start: weights so large that the pre-activations are about
// ±1000. tanh is then ±1 with zero derivative and the softmax inputs are
// far apart; the cost must stay finite (log-sum-exp, not log of a
// rounded-to-zero probability) and training must return finite params.
func TestFaultSaturatedStart(t *testing.T) {
	s := parseSpec(t, faultSpec)
	set := twoBlobs(40, 1, 2)
	net, err := nn.Compile(s)
	require.NoError(t, err)
	start := net.NewParams()
	for i := range start {
		start[i] *= 1000
	}
	for _, m := range []optim.Method{&optim.LBFGS{}, &optim.GradientDescent{}, &optim.Adam{Rate: 0.1, Seed: 1}} {
		res, err := Train(context.Background(), s, set, Options{Method: m, Start: start, Limits: optim.Limits{Iterations: 30}})
		if err != nil {
			t.Logf("%T: %v", m, err)
			require.NotNil(t, res, "%T: no result with %v", m, err)
		}
		requireSound(t, res.Model, set)
		// Cost at the start: each misclassified row costs about the gap
		// of its output pre-activations (≈ 10³), so far more than ln 2.
		assert.Greater(t, res.Trace[0].Cost, 1.0, "%T", m)
	}
}

// Gradient descent with a step of 10⁶ on an unbounded (identity) hidden
// layer diverges: the run stops with status Diverged, the error wraps
// optim.ErrDiverged, and the model holds the best finite params seen.
func TestFaultDivergingStep(t *testing.T) {
	s := parseSpec(t, strings.Replace(faultSpec, "tanh", "identity", 1))
	set := twoBlobs(40, 1, 3)
	res, err := Train(context.Background(), s, set, Options{Method: &optim.GradientDescent{Step: 1e6}, Limits: optim.Limits{Iterations: 200}})
	require.Error(t, err)
	assert.ErrorIs(t, err, optim.ErrDiverged)
	t.Logf("message: %v", err)
	require.NotNil(t, res)
	assert.Equal(t, optim.Diverged, res.Run.Status)
	requireSound(t, res.Model, set)
	// The best params are those of the lowest cost in the trace (or the
	// start): never higher than the first cost recorded.
	assert.LessOrEqual(t, res.Run.Cost, res.Trace[0].Cost)
}

// A constant feature column is centred, not scaled (a scale of 0 would
// divide by zero); the run names it in a warning.
func TestFaultConstantFeature(t *testing.T) {
	s := parseSpec(t, faultSpec)
	set := twoBlobs(40, 1, 4)
	for i := range set.Rows() {
		set.X.Set(i, 1, 7.5)
	}
	res, err := Train(context.Background(), s, set, Options{})
	require.NoError(t, err)
	requireSound(t, res.Model, set)
	require.Len(t, res.Warnings, 1)
	assert.Contains(t, res.Warnings[0], "constant")
	assert.Contains(t, res.Warnings[0], "f1")
	assert.Equal(t, 1.0, res.Model.Encoder().Inputs()[1].Scale)
}

// A class with a single example: training works; a stratified split or
// k folds either place it or say clearly why they cannot.
func TestFaultSingleExampleClass(t *testing.T) {
	s := parseSpec(t, strings.Replace(faultSpec, "[a, b]", "[a, b, c]", 1))
	set := twoBlobs(30, 1, 5)
	y := mat.NewDense(30, 3, nil)
	for i := range 30 {
		y.Set(i, set.Labels()[i], 1)
	}
	y.Set(0, 0, 0)
	y.Set(0, 2, 1) // row 0 is the one example of c
	set.Y, set.Classes = y, []string{"a", "b", "c"}

	res, err := Train(context.Background(), s, set, Options{})
	require.NoError(t, err)
	requireSound(t, res.Model, set)

	tr, ho, err := data.Split(set, 0.3, 1)
	if err != nil {
		t.Logf("split: %v", err)
		assert.NotEmpty(t, err.Error())
	} else {
		assert.Equal(t, 30, tr.Rows()+ho.Rows())
		res, err := Train(context.Background(), s, tr, Options{Holdout: ho})
		require.NoError(t, err)
		requireSound(t, res.Model, tr)
		assert.False(t, math.IsNaN(res.Model.Summary().HoldoutCost))
	}
	folds, err := data.Folds(set, 5, 1)
	if err != nil {
		t.Logf("folds: %v", err)
		assert.NotEmpty(t, err.Error())
		return
	}
	n := 0
	for _, f := range folds {
		n += len(f)
	}
	assert.Equal(t, 30, n, "every row in exactly one fold")
}

// Every row appears twice, once per class. No model can do better than
// probability ½ on each pair, so by Gibbs' inequality the mean
// cross-entropy is at least ln 2; with no penalty, the zero-output-gap
// solution reaches it, so training must end within 10⁻³ above it, finite.
func TestFaultConflictingDuplicates(t *testing.T) {
	s := parseSpec(t, strings.Replace(faultSpec, "l2: 0.1", "l2: 0", 1))
	base := twoBlobs(20, 1, 6)
	x := mat.NewDense(40, 2, nil)
	y := mat.NewDense(40, 2, nil)
	for i := range 20 {
		x.SetRow(2*i, base.X.RawRowView(i))
		x.SetRow(2*i+1, base.X.RawRowView(i))
		y.Set(2*i, 0, 1)
		y.Set(2*i+1, 1, 1)
	}
	set := &data.Set{X: x, Y: y, Classes: []string{"a", "b"}, Features: []string{"f0", "f1"}}
	res, err := Train(context.Background(), s, set, Options{Limits: optim.Limits{Iterations: 200}})
	require.NoError(t, err)
	requireSound(t, res.Model, set)
	assert.GreaterOrEqual(t, res.Model.Summary().Cost, math.Ln2-1e-12)
	assert.LessOrEqual(t, res.Model.Summary().Cost, math.Ln2+1e-3)
}

// Same seed, data and settings give bit-identical params for every
// optimizer, with GOMAXPROCS 1 and 2 (and under -race when the suite runs
// so). The mini-batch methods shuffle with their seed.
func TestDeterministicEveryMethod(t *testing.T) {
	s := parseSpec(t, irisSpec)
	set := readSet(t, "testdata/iris.csv", s.Output.Classes)
	methods := map[string]func() optim.Method{
		"gd":       func() optim.Method { return &optim.GradientDescent{} },
		"gd-fixed": func() optim.Method { return &optim.GradientDescent{Step: 0.1} },
		"cg":       func() optim.Method { return &optim.ConjugateGradient{} },
		"lbfgs":    func() optim.Method { return &optim.LBFGS{} },
		"momentum": func() optim.Method { return &optim.Momentum{Rate: 0.05, Seed: 4} },
		"adam":     func() optim.Method { return &optim.Adam{Rate: 0.01, Seed: 4} },
	}
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	for name, mk := range methods {
		var first []float64
		for _, procs := range []int{1, 2, 1} {
			runtime.GOMAXPROCS(procs)
			res, err := Train(context.Background(), s, set, Options{Method: mk(), Batch: 32, Limits: optim.Limits{Iterations: 15}})
			if err != nil && !errors.Is(err, optim.ErrDiverged) {
				require.NoError(t, err, name)
			}
			if first == nil {
				first = res.Model.Params()
				continue
			}
			for i := range first {
				require.Equal(t, math.Float64bits(first[i]), math.Float64bits(res.Model.Params()[i]), "%s: param %d with GOMAXPROCS=%d", name, i, procs)
			}
		}
	}
}
