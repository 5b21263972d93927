package score

import (
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

// A hand-worked three-class example, six rows.
//
//	row truth  probabilities (a, b, c)   predicted
//	1   a      0.7 0.2 0.1               a  ✓
//	2   a      0.2 0.5 0.3               b  ✗
//	3   b      0.1 0.8 0.1               b  ✓
//	4   b      0.3 0.3 0.4               c  ✗
//	5   c      0.1 0.1 0.8               c  ✓
//	6   c      0.25 0.25 0.5             c  ✓
//
// Confusion (rows true, columns predicted): a: [1 1 0], b: [0 1 1], c: [0 0 2].
// accuracy = 4/6. Precision: a 1/1, b 1/2, c 2/3. Recall: a 1/2, b 1/2, c 2/2.
// F1: a 2·1·½/(1½) = 2/3; b ½; c 2·⅔·1/(1⅔) = 0.8. Macro F1 = (2/3+1/2+4/5)/3 = 59/90.
// Cross-entropy = −(ln .7 + ln .2 + ln .8 + ln .3 + ln .8 + ln .5)/6.
func TestEvaluateWorkedExample(t *testing.T) {
	p := mat.NewDense(6, 3, []float64{
		0.7, 0.2, 0.1,
		0.2, 0.5, 0.3,
		0.1, 0.8, 0.1,
		0.3, 0.3, 0.4,
		0.1, 0.1, 0.8,
		0.25, 0.25, 0.5,
	})
	y := mat.NewDense(6, 3, []float64{1, 0, 0, 1, 0, 0, 0, 1, 0, 0, 1, 0, 0, 0, 1, 0, 0, 1})
	r, err := Evaluate(p, y, []string{"a", "b", "c"}, Options{})
	require.NoError(t, err)
	assert.Equal(t, [][]int{{1, 1, 0}, {0, 1, 1}, {0, 0, 2}}, r.Confusion)
	assert.InDelta(t, 4.0/6, r.Accuracy, 1e-15)
	assert.InDelta(t, 59.0/90, r.MacroF1, 1e-15)
	want := -(math.Log(.7) + math.Log(.2) + math.Log(.8) + math.Log(.3) + math.Log(.8) + math.Log(.5)) / 6
	assert.InDelta(t, want, r.CrossEntropy, 1e-15)
	// Reference: gonum stat.CrossEntropy(p, q) = −Σ p_i ln q_i, a
	// general-purpose library, applied row by row with p = the one-hot truth.
	var ref float64
	for i := 0; i < 6; i++ {
		ref += stat.CrossEntropy(y.RawRowView(i), p.RawRowView(i))
	}
	assert.InDelta(t, ref/6, r.CrossEntropy, 1e-15)
	c := r.PerClass[2]
	assert.Equal(t, "c", c.Name)
	assert.Equal(t, 2, c.Rows)
	assert.Equal(t, 3, c.Predicted)
	assert.InDelta(t, 2.0/3, c.Precision, 1e-15)
	assert.InDelta(t, 1, c.Recall, 1e-15)
	assert.InDelta(t, 0.8, c.F1, 1e-15)
	assert.Nil(t, r.HammingLoss)
	assert.InDelta(t, r.Accuracy, Accuracy(p, y, false), 0)
}

// Multi-label, two rows, three classes, threshold 0.5.
//
//	row truth   probabilities   decided   wrong decisions
//	1   {a,c}   .9 .6 .7        {a,b,c}   1 (b)
//	2   {b}     .2 .8 .1        {b}       0
//
// exact-set match = 1/2, Hamming loss = 1/6.
// Per class: a rows 1 predicted 1 tp 1; b rows 1 predicted 2 tp 1; c rows 1 predicted 1 tp 1.
func TestEvaluateMultilabel(t *testing.T) {
	p := mat.NewDense(2, 3, []float64{.9, .6, .7, .2, .8, .1})
	y := mat.NewDense(2, 3, []float64{1, 0, 1, 0, 1, 0})
	r, err := Evaluate(p, y, []string{"a", "b", "c"}, Options{Multilabel: true})
	require.NoError(t, err)
	assert.InDelta(t, 0.5, r.Accuracy, 1e-15)
	require.NotNil(t, r.HammingLoss)
	assert.InDelta(t, 1.0/6, *r.HammingLoss, 1e-15)
	assert.Equal(t, 2, r.PerClass[1].Predicted)
	assert.InDelta(t, 0.5, r.PerClass[1].Precision, 1e-15)
	// Binary cross-entropy summed over classes, averaged over rows.
	want := -(math.Log(.9) + math.Log(.4) + math.Log(.7) + math.Log(.8) + math.Log(.8) + math.Log(.9)) / 2
	assert.InDelta(t, want, r.CrossEntropy, 1e-14)
	assert.Nil(t, r.Confusion)
	assert.InDelta(t, 0.5, Accuracy(p, y, true), 0)
}

func TestEvaluateErrors(t *testing.T) {
	good := mat.NewDense(1, 2, []float64{0.5, 0.5})
	_, err := Evaluate(good, mat.NewDense(1, 3, nil), []string{"a", "b"}, Options{})
	assert.ErrorContains(t, err, "targets 1×3")
	_, err = Evaluate(mat.NewDense(1, 2, []float64{math.NaN(), 1}), good, []string{"a", "b"}, Options{})
	assert.ErrorContains(t, err, `row 1, class "a"`)
	_, err = Evaluate(good, good, []string{"a", "b"}, Options{Multilabel: true, Threshold: 2})
	assert.ErrorContains(t, err, "threshold")
}

// A confident wrong answer gives a large finite cross-entropy.
func TestCrossEntropyFinite(t *testing.T) {
	p := mat.NewDense(1, 2, []float64{1, 0})
	y := mat.NewDense(1, 2, []float64{0, 1})
	r, err := Evaluate(p, y, []string{"a", "b"}, Options{})
	require.NoError(t, err)
	assert.False(t, math.IsInf(r.CrossEntropy, 0))
	assert.InDelta(t, -math.Log(floor), r.CrossEntropy, 1e-9)
}

// Each warning of Warnings, on reports of 100 rows built by hand, split
// between class "ok" and a rarer class "fraud".
func TestWarnings(t *testing.T) {
	mk := func(acc float64, classes ...Class) *Report {
		return &Report{Rows: 100, Accuracy: acc, PerClass: classes}
	}
	quiet := mk(0.99, Class{Name: "ok", Rows: 90, Precision: 0.99, Recall: 0.99}, Class{Name: "fraud", Rows: 10, Precision: 0.9, Recall: 0.8})
	assert.Empty(t, Warnings(quiet, "holdout", false), "no warning expected")
	for _, tc := range []struct {
		name string
		r    *Report
		want string
	}{
		{"below the majority share", mk(0.95, Class{Name: "ok", Rows: 97, Precision: 0.97, Recall: 0.98}, Class{Name: "fraud", Rows: 3}), "below the share of the largest class \"ok\" (0.9700)"},
		{"few rows", mk(0.99, Class{Name: "ok", Rows: 97, Precision: 1, Recall: 1}, Class{Name: "fraud", Rows: 3, Precision: 1, Recall: 0.67}), "only 3 holdout rows"},
		{"no rows", mk(1, Class{Name: "ok", Rows: 100, Precision: 1, Recall: 1}, Class{Name: "fraud"}), "no holdout rows"},
		{"recall far below precision", mk(0.98, Class{Name: "ok", Rows: 92, Precision: 0.98, Recall: 1}, Class{Name: "fraud", Rows: 8, Precision: 1, Recall: 0.25}), "recall 0.2500 is far below precision 1.0000"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			w := Warnings(tc.r, "holdout", false)
			found := false
			for _, s := range w {
				found = found || strings.Contains(s, tc.want)
			}
			assert.True(t, found, "warnings %q lack %q", w, tc.want)
		})
	}
	tilted := mk(0.95, Class{Name: "ok", Rows: 97, Precision: 0.99, Recall: 0.95}, Class{Name: "fraud", Rows: 3, Precision: 0.3, Recall: 1})
	for _, w := range Warnings(tilted, "holdout", true) {
		assert.NotContains(t, w, "largest class", "a tilted model is not warned for accuracy below the majority share")
	}
}
