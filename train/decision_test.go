package train

import (
	"context"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/score"
)

// eceOn is the ECE of m's probabilities on set.
func eceOn(t *testing.T, m *nn.Model, set *data.Set) float64 {
	t.Helper()
	coded, err := m.Encoder().CodeSet(set)
	require.NoError(t, err)
	var p mat.Dense
	m.ProbabilitiesBatch(&p, coded)
	rel, err := score.ReliabilityDiagram(&p, set.Y, m.Classes(), false)
	require.NoError(t, err)
	return rel.ECE
}

// Temperature scaling (Guo et al. 2017) on an over-confident model: WDBC
// (Street, Wolberg & Mangasarian 1993, testdata/wdbc.csv) fitted with no
// penalty and a wide hidden layer until its training cost is near 0, so
// its holdout probabilities sit at 0 and 1 even on the rows it gets wrong.
// The temperature is fitted on one third of the rows kept out and the ECE
// measured on another third it never saw: it must fall. And a model
// without calibration keeps a temperature of none.
func TestCalibrateLowersECE(t *testing.T) {
	s := parseSpec(t, strings.Replace(strings.Replace(wdbcSpec, "l2: 1", "l2: 0", 1), "units: 8", "units: 32", 1))
	set := readSet(t, "testdata/wdbc.csv", s.Output.Classes)
	rest, test, err := data.Split(set, 1.0/3, 17)
	require.NoError(t, err)
	tr, hold, err := data.Split(rest, 0.5, 17)
	require.NoError(t, err)

	plain, err := Train(context.Background(), s, tr, Options{Holdout: hold})
	require.NoError(t, err)
	assert.True(t, plain.Model.Decision().IsZero())
	cal, err := Train(context.Background(), s, tr, Options{Holdout: hold, Calibrate: true})
	require.NoError(t, err)
	T := cal.Model.Decision().Temperature
	sm := cal.Model.Summary()
	t.Logf("T = %.4g; holdout ECE %.4f → %.4f; test ECE %.4f → %.4f", T, sm.HoldoutECEBefore, sm.HoldoutECE, eceOn(t, plain.Model, test), eceOn(t, cal.Model, test))
	assert.Greater(t, T, 1.0, "an over-confident model is cooled")
	assert.Less(t, sm.HoldoutECE, sm.HoldoutECEBefore)
	assert.Less(t, eceOn(t, cal.Model, test), eceOn(t, plain.Model, test), "the ECE falls on rows the temperature never saw")
	// The params are the same run's: the temperature changes probabilities,
	// not the net.
	assert.Equal(t, plain.Model.Params(), cal.Model.Params())
}

// Operating thresholds chosen on holdout rows reach their target there (by
// construction of score.ChooseThreshold), are recorded with the figures
// at that point, and drive the model's decisions: with a target recall of
// 0.99 for malignant WDBC rows the model predicts malignant at least as
// often as by the most probable class.
func TestThresholdRuleOnHoldout(t *testing.T) {
	s := parseSpec(t, strings.Replace(wdbcSpec, "classes: [malignant, benign]", "classes: [benign, malignant]", 1))
	set := readSet(t, "testdata/wdbc.csv", s.Output.Classes)
	tr, hold, err := data.Split(set, 0.3, 5)
	require.NoError(t, err)
	res, err := Train(context.Background(), s, tr, Options{Holdout: hold, Thresholds: &ThresholdRule{Rule: score.TargetRecall, Target: 0.99}})
	require.NoError(t, err)
	m := res.Model
	require.Len(t, m.Decision().Thresholds, 1)
	require.Len(t, m.Summary().Operating, 1)
	op := m.Summary().Operating[0]
	assert.Equal(t, "malignant", op.Class)
	assert.Equal(t, m.Decision().Thresholds[0], op.Threshold)
	assert.Equal(t, "target-recall", m.Decision().Rule)
	assert.GreaterOrEqual(t, op.Recall, 0.99)

	coded, err := m.Encoder().CodeSet(hold)
	require.NoError(t, err)
	var p mat.Dense
	m.ProbabilitiesBatch(&p, coded)
	pred := m.PredictBatch(nil, coded)
	tp, pos, predicted := 0, 0, 0
	for i, k := range pred {
		truth := hold.Y.At(i, 1) > 0.5
		if truth {
			pos++
		}
		if k == 1 {
			predicted++
			if truth {
				tp++
			}
		}
		assert.Equal(t, p.At(i, 1) >= op.Threshold, k == 1, "row %d", i)
	}
	// The recall of the model's own decisions on the holdout rows is the
	// recorded one, exactly: the same rows, the same threshold.
	assert.Equal(t, op.Recall, float64(tp)/float64(pos))
	assert.InDelta(t, op.Precision, float64(tp)/float64(predicted), 1e-15)

	_, err = Train(context.Background(), parseSpec(t, irisSpec), readSet(t, "testdata/iris.csv", nil), Options{Thresholds: &ThresholdRule{}})
	assert.ErrorIs(t, err, ErrOptions, "no holdout")
}
