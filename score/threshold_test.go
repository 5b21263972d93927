package score

import (
	"encoding/json"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// Hand-worked operating thresholds: nine rows, P = 4 positives (+),
// N = 5 negatives (−). A row is decided positive when its probability is
// ≥ the threshold, so each candidate counts its own row.
//
//	t    label  TP FP FN  precision  recall  F1 = 2TP/(2TP+FP+FN)
//	.9   +       1  0  3  1          1/4     2/5
//	.8   +       2  0  2  1          1/2     4/6
//	.7   −       2  1  2  2/3        1/2     4/7
//	.6   +       3  1  1  3/4        3/4     6/8  ← highest F1
//	.5   −       3  2  1  3/5        3/4     6/9
//	.4   −       3  3  1  1/2        3/4     6/10
//	.3   +       4  3  0  4/7        1       8/11
//	.2   −       4  4  0  1/2        1       8/12
//	.1   −       4  5  0  4/9        1       8/13
//
//	max-f1                 → .6 (F1 3/4)
//	target-recall .5       → recall ≥ .5 at .8 … .1; precision highest (1) at .8
//	target-recall .25      → precision 1 at both .9 and .8: the tie goes to .9
//	target-recall .9       → recall ≥ .9 at .3, .2, .1; precision highest (4/7) at .3
//	target-precision .7    → precision ≥ .7 at .9, .8, .6; recall highest (3/4) at .6
//	target-precision 1     → .9 and .8; recall highest (1/2) at .8
//
// FPR = FP/5 at the chosen point.
func TestChooseThresholdWorkedExample(t *testing.T) {
	probs := []float64{.9, .8, .7, .6, .5, .4, .3, .2, .1}
	pos := []bool{true, true, false, true, false, false, true, false, false}
	tests := []struct {
		rule         Rule
		target       float64
		th, prec, rc float64
		f1, fpr      float64
	}{
		{MaxF1, 0, .6, 3.0 / 4, 3.0 / 4, 6.0 / 8, 1.0 / 5},
		{TargetRecall, .5, .8, 1, 1.0 / 2, 4.0 / 6, 0},
		{TargetRecall, .25, .9, 1, 1.0 / 4, 2.0 / 5, 0},
		{TargetRecall, .9, .3, 4.0 / 7, 1, 8.0 / 11, 3.0 / 5},
		{TargetPrecision, .7, .6, 3.0 / 4, 3.0 / 4, 6.0 / 8, 1.0 / 5},
		{TargetPrecision, 1, .8, 1, 1.0 / 2, 4.0 / 6, 0},
	}
	for _, tt := range tests {
		t.Run(tt.rule.String(), func(t *testing.T) {
			op, err := ChooseThreshold(probs, pos, tt.rule, tt.target)
			require.NoError(t, err)
			// Every figure is one division of small integers, correctly
			// rounded, so it equals the same fraction written in Go.
			assert.Equal(t, Operating{Rule: tt.rule, Target: tt.target, Threshold: tt.th,
				Precision: tt.prec, Recall: tt.rc, F1: tt.f1, FPR: tt.fpr}, op)
		})
	}
}

// Equal F1 at two thresholds: rows .9 (+), .5 (−), .4 (−), .3 (+).
// At .9: TP 1, FP 0, FN 1, F1 = 2/3. At .3: TP 2, FP 2, FN 0, F1 = 4/6 = 2/3.
// The tie goes to the higher threshold, .9. With tied probabilities the
// group is decided together: rows .5 (+), .5 (−), .2 (−) give at .5 TP 1,
// FP 1 (both .5 rows), FN 0: precision 1/2, F1 2/3; at .2 F1 is 2/4.
func TestChooseThresholdTies(t *testing.T) {
	op, err := ChooseThreshold([]float64{.9, .5, .4, .3}, []bool{true, false, false, true}, MaxF1, 0)
	require.NoError(t, err)
	assert.Equal(t, .9, op.Threshold)
	assert.Equal(t, 2.0/3, op.F1)

	op, err = ChooseThreshold([]float64{.5, .5, .2}, []bool{true, false, false}, MaxF1, 0)
	require.NoError(t, err)
	assert.Equal(t, .5, op.Threshold)
	assert.Equal(t, .5, op.Precision)
	assert.Equal(t, 2.0/3, op.F1)
}

func TestChooseThresholdErrors(t *testing.T) {
	probs := []float64{.9, .5}
	pos := []bool{false, true}
	// Precision is 0 at .9 and 1/2 at .5, so .6 cannot be reached.
	_, err := ChooseThreshold(probs, pos, TargetPrecision, .6)
	assert.ErrorIs(t, err, ErrUnreachable)
	assert.ErrorContains(t, err, "highest precision over 2 thresholds is 0.5")
	_, err = ChooseThreshold(probs, []bool{false, false}, MaxF1, 0)
	assert.ErrorIs(t, err, ErrNoPositives)
	for _, target := range []float64{0, -0.1, 1.5, math.NaN()} {
		_, err = ChooseThreshold(probs, pos, TargetRecall, target)
		assert.ErrorIs(t, err, ErrValue, "target %v", target)
	}
	_, err = ChooseThreshold(probs, pos, Rule(7), .5)
	assert.ErrorIs(t, err, ErrValue)
	_, err = ChooseThreshold([]float64{.2, 1.2}, pos, MaxF1, 0)
	assert.ErrorIs(t, err, ErrValue)
	assert.ErrorContains(t, err, "row 2")
	_, err = ChooseThreshold(probs, []bool{true}, MaxF1, 0)
	assert.ErrorIs(t, err, ErrShape)

	// Per class: the error names the class.
	p := mat.NewDense(2, 2, []float64{.9, .1, .5, .2})
	y := mat.NewDense(2, 2, []float64{1, 0, 0, 0})
	_, err = ChooseThresholds(p, y, []string{"fraud", "spam"}, MaxF1, 0)
	assert.ErrorIs(t, err, ErrNoPositives)
	assert.ErrorContains(t, err, `class "spam"`)
}

func TestChooseThresholds(t *testing.T) {
	// Column a is the worked example's first three rows, column b the
	// same probabilities reversed; each is chosen on its own.
	p := mat.NewDense(3, 2, []float64{.9, .1, .8, .2, .7, .3})
	y := mat.NewDense(3, 2, []float64{1, 0, 1, 1, 0, 0})
	ops, err := ChooseThresholds(p, y, []string{"a", "b"}, MaxF1, 0)
	require.NoError(t, err)
	require.Len(t, ops, 2)
	assert.Equal(t, .8, ops[0].Threshold) // TP 2, FP 0: F1 1
	assert.Equal(t, 1.0, ops[0].F1)
	// b: at .3 TP 0 (F1 0); at .2 TP 1, FP 1: F1 2/3; at .1 TP 1, FP 2: F1 1/2.
	assert.Equal(t, .2, ops[1].Threshold)
	assert.Equal(t, 2.0/3, ops[1].F1)
}

func TestRuleText(t *testing.T) {
	op := Operating{Rule: TargetRecall, Target: 0.9, Threshold: 0.25, Precision: 0.5, Recall: 0.95, F1: 0.6, FPR: 0.1}
	b, err := json.Marshal(op)
	require.NoError(t, err)
	assert.JSONEq(t, `{"rule":"target-recall","target":0.9,"threshold":0.25,"precision":0.5,"recall":0.95,"f1":0.6,"fpr":0.1}`, string(b))
	var back Operating
	require.NoError(t, json.Unmarshal(b, &back))
	assert.Equal(t, op, back)
	var r Rule
	assert.ErrorIs(t, r.UnmarshalText([]byte("Max-F1")), ErrValue) // exact names only
	_, err = Rule(9).MarshalText()
	assert.ErrorIs(t, err, ErrValue)
}
