package nn

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/spec"
)

// withDecision returns a copy of m (same spec, params and encoder) with d.
func withDecision(t *testing.T, m *Model, d Decision) (*Model, error) {
	t.Helper()
	c := &Model{spec: m.spec, params: m.params, classes: m.classes, enc: m.enc, decision: d}
	return c, c.init()
}

// A temperature T divides the output pre-activations: the tempered model's
// probabilities equal g(z/T) computed from the plain model's logits (to
// rounding: dividing W and b by T before the product rounds differently
// from dividing z after it, within a few ulps of z). T = 1 leaves every
// probability bit for bit as it was.
func TestDecisionTemperature(t *testing.T) {
	for _, tc := range []struct {
		out   spec.Activation
		names []string
		multi bool
	}{{spec.Softmax, []string{"x", "y", "z"}, false}, {spec.Sigmoid, []string{"no", "yes"}, false}, {spec.Sigmoid, []string{"p", "q", "r"}, true}} {
		m := testModel(t, tc.out, tc.names, tc.multi)
		one, err := withDecision(t, m, Decision{Temperature: 1})
		require.NoError(t, err)
		hot, err := withDecision(t, m, Decision{Temperature: 2.5})
		require.NoError(t, err)
		ws := m.Net().NewWorkspace(1)
		for _, x := range rows() {
			a, b := m.Probabilities(nil, x), one.Probabilities(nil, x)
			for k := range a {
				require.Equal(t, math.Float64bits(a[k]), math.Float64bits(b[k]), "T = 1 changes nothing")
			}
			u := m.Encoder().Expand(make([]float64, m.Net().Inputs()), x)
			z := m.Net().Logits(ws, m.params, denseRow(u)).RawRowView(0)
			want := make([]float64, len(z))
			for k, v := range z {
				want[k] = v / 2.5
			}
			want = outputOf(tc.out, want)
			got := hot.Probabilities(nil, x)
			if len(got) == 2 && len(want) == 1 {
				want = []float64{1 - want[0], want[0]}
			}
			for k := range got {
				assert.InDelta(t, want[k], got[k], 1e-14, "%v class %d", tc.out, k)
			}
		}
	}
}

// outputOf is the output activation written plainly, for the test.
func outputOf(g spec.Activation, z []float64) []float64 {
	out := make([]float64, len(z))
	if g == spec.Sigmoid {
		for k, v := range z {
			out[k] = 1 / (1 + math.Exp(-v))
		}
		return out
	}
	s := 0.0
	for k, v := range z {
		out[k] = math.Exp(v)
		s += out[k]
	}
	for k := range out {
		out[k] /= s
	}
	return out
}

// A binary model with an operating threshold t predicts class 1 exactly
// when p₁ ≥ t; a multi-label model's Labels use its per-class thresholds.
func TestDecisionThresholds(t *testing.T) {
	m := testModel(t, spec.Sigmoid, []string{"no", "yes"}, false)
	for _, x := range rows() {
		p := m.Probabilities(nil, x)[1]
		for _, th := range []float64{0.01, p, math.Nextafter(p, 2), 0.99} {
			d, err := withDecision(t, m, Decision{Thresholds: []float64{th}, Rule: "max-f1"})
			require.NoError(t, err)
			want := 0
			if p >= th {
				want = 1
			}
			assert.Equal(t, want, d.Predict(x), "p = %v, t = %v", p, th)
			assert.Equal(t, []int{want}, d.PredictBatch(nil, denseRow(x)))
		}
	}
	ml := testModel(t, spec.Sigmoid, []string{"p", "q", "r"}, true)
	x := rows()[2]
	probs := ml.Probabilities(nil, x)
	th := []float64{probs[0], math.Nextafter(probs[1], 2), 0}
	d, err := withDecision(t, ml, Decision{Thresholds: th})
	require.NoError(t, err)
	assert.Equal(t, []int{0, 2}, d.Labels(nil, x, 0), "the model's thresholds")
	assert.Equal(t, ml.Labels(nil, x, 0.5), d.Labels(nil, x, 0.5), "an explicit threshold overrides them")
}

func TestDecisionRoundTripAndChecks(t *testing.T) {
	m := testModel(t, spec.Sigmoid, []string{"p", "q", "r"}, true)
	d, err := withDecision(t, m, Decision{Temperature: 1.75, Thresholds: []float64{0.2, 0.5, 0.9}, Rule: "recall", Target: 0.9})
	require.NoError(t, err)
	var buf bytes.Buffer
	_, err = d.WriteTo(&buf)
	require.NoError(t, err)
	assert.Contains(t, buf.String(), `"decision"`)
	got, err := ReadModel(bytes.NewReader(buf.Bytes()))
	require.NoError(t, err)
	assert.Equal(t, d.decision, got.decision)
	x := rows()[1]
	assert.Equal(t, d.Probabilities(nil, x), got.Probabilities(nil, x))
	// The decision is inside the checksum.
	tampered := strings.Replace(buf.String(), `0.9`, `0.8`, 1)
	_, err = ReadModel(strings.NewReader(tampered))
	assert.ErrorIs(t, err, ErrChecksum)

	soft := testModel(t, spec.Softmax, []string{"x", "y", "z"}, false)
	bin := testModel(t, spec.Sigmoid, []string{"no", "yes"}, false)
	for _, tc := range []struct {
		name string
		m    *Model
		d    Decision
		msg  string
	}{
		{"thresholds on softmax", soft, Decision{Thresholds: []float64{0.5, 0.5, 0.5}}, "sigmoid outputs only"},
		{"binary needs one", bin, Decision{Thresholds: []float64{0.5, 0.5}}, "needs 1"},
		{"multi-label needs one per class", m, Decision{Thresholds: []float64{0.5}}, "needs 3"},
		{"threshold outside [0, 1]", bin, Decision{Thresholds: []float64{1.5}}, "probability"},
		{"negative temperature", soft, Decision{Temperature: -1}, "temperature"},
		{"infinite temperature", soft, Decision{Temperature: math.Inf(1)}, "temperature"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := withDecision(t, tc.m, tc.d)
			require.ErrorIs(t, err, ErrModel)
			assert.Contains(t, err.Error(), tc.msg)
		})
	}
}

// denseRow is x as a 1-row matrix.
func denseRow(x []float64) *mat.Dense { return mat.NewDense(1, len(x), append([]float64(nil), x...)) }
