package diag

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/stat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/optim"
)

// wdbcNet is the net of the penalty sweep on wdbc: 30 raw inputs, 8 tanh
// units, a softmax over the two classes.
const wdbcNet = `version: 1
inputs: 30
hidden:
  - units: 8
    activation: tanh
output:
  classes: [benign, malignant]
`

// TestSweepInteriorWDBC: the validation cost of a penalty sweep is
// smallest at an interior λ, the usual U shape between overfitting at
// small λ and underfitting at large λ (common practice).
//
// Setting (found by trying subsets of 100 and 200 rows, with and without
// the hidden layer): a stratified subset of 200 of the 569 wdbc rows
// (data.SplitIndices, seed 3), the net wdbcNet trained on the raw features
// (NoScale: they differ in scale by four orders of magnitude) with
// L-BFGS for at most 300 iterations, 5 stratified folds, λ ∈ {0, 0.1, 1,
// 10, 100, 1000}. Measured: the lowest mean validation cost is at λ = 10
// (0.226 nats); λ = 0 leaves the tanh units saturated by the raw inputs
// (0.662, no better than the class shares) and λ = 1000 shrinks the net to
// near the class shares (0.511). The test asks for an interior minimum at
// least 0.1 nats below both ends, a margin of over 2.5× the gap measured
// between the best and the nearest end.
func TestSweepInteriorWDBC(t *testing.T) {
	set := readSet(t, "wdbc.csv")
	_, sub, err := data.SplitIndices(set, 200.0/569, 3)
	require.NoError(t, err)
	lambdas := []float64{0, 0.1, 1, 10, 100, 1000}
	sw, err := SweepPenalty(context.Background(), parseSpec(t, wdbcNet), set.Subset(sub), lambdas, SweepOptions{
		NoScale: true,
		Limits:  optim.Limits{Iterations: 300},
	})
	require.NoError(t, err)
	for _, p := range sw.Points {
		t.Logf("λ = %-6g train %.4f  valid %.4f [%.4f, %.4f]  accuracy %.3f", p.Lambda, p.TrainCost.Mean, p.HoldoutCost.Mean, p.HoldoutCost.Min, p.HoldoutCost.Max, p.HoldoutAccuracy.Mean)
	}
	assert.Equal(t, DefaultFolds, sw.Folds, "folds")
	assert.Equal(t, PenaltyL2, sw.Param, "param")
	b := sw.Best
	require.NotEqual(t, 0, b, "best λ = %g is at an end of the grid", lambdas[0])
	require.NotEqual(t, len(lambdas)-1, b, "best λ = %g is at an end of the grid", lambdas[len(lambdas)-1])
	best := sw.Points[b].HoldoutCost.Mean
	for _, end := range []int{0, len(lambdas) - 1} {
		d := sw.Points[end].HoldoutCost.Mean - best
		assert.GreaterOrEqual(t, d, 0.1, "validation cost at λ = %g is only %.3g above the best (λ = %g)", lambdas[end], d, lambdas[b])
	}
	for i, p := range sw.Points {
		assert.Equal(t, lambdas[i], p.Lambda, "λ of point %d", i)
		assert.GreaterOrEqual(t, p.HoldoutCost.Mean, sw.Points[b].HoldoutCost.Mean, "Best is not the lowest validation cost (point %d)", i)
	}
}

// TestSweepUnitsHoldout sweeps hidden units on iris with one holdout split.
func TestSweepUnitsHoldout(t *testing.T) {
	s := parseSpec(t, `version: 1
inputs: 4
hidden:
  - units: 3
    activation: tanh
output:
  classes: [setosa, versicolor, virginica]
penalty:
  l2: 0.1
`)
	set := readSet(t, "iris.csv")
	sw, err := SweepUnits(context.Background(), s, set, []int{1, 4}, SweepOptions{Holdout: 0.3, Limits: optim.Limits{Iterations: 100}})
	require.NoError(t, err)
	require.Equal(t, 1, sw.Folds, "folds; sweep = %+v", sw)
	require.Equal(t, HiddenUnits, sw.Param, "param; sweep = %+v", sw)
	require.Len(t, sw.Points, 2, "points; sweep = %+v", sw)
	for i, u := range []int{1, 4} {
		p := sw.Points[i]
		assert.Equal(t, u, p.Units, "point %d: units", i)
		assert.Equal(t, 0.1, p.Lambda, "point %d: λ, want the spec's 0.1", i)
		// One fit: no spread, SD 0 by definition of statOf.
		assert.Equal(t, 0.0, p.HoldoutCost.SD, "point %d: one fit has a spread: %+v", i, p.HoldoutCost)
		assert.Equal(t, p.HoldoutCost.Min, p.HoldoutCost.Max, "point %d: one fit has a spread: %+v", i, p.HoldoutCost)
	}
	// A small net separates iris to ~0.95 accuracy on held-out rows
	// (common practice); 0.9 leaves room for a 45-row holdout (one row is
	// 0.022).
	assert.GreaterOrEqual(t, sw.Points[1].HoldoutAccuracy.Mean, 0.9, "4 units: validation accuracy")
	assert.Equal(t, 3, s.Hidden[0].Units, "the caller's spec was changed")
}

func TestSweepErrors(t *testing.T) {
	s := parseSpec(t, irisLogistic)
	set := readSet(t, "iris.csv")
	ctx := context.Background()
	tests := []struct {
		name string
		run  func() error
	}{
		{"no lambdas", func() error { _, err := SweepPenalty(ctx, s, set, nil, SweepOptions{}); return err }},
		{"negative lambda", func() error { _, err := SweepPenalty(ctx, s, set, []float64{-1}, SweepOptions{}); return err }},
		{"NaN lambda", func() error { _, err := SweepPenalty(ctx, s, set, []float64{math.NaN()}, SweepOptions{}); return err }},
		{"one fold", func() error { _, err := SweepPenalty(ctx, s, set, []float64{1}, SweepOptions{Folds: 1}); return err }},
		{"folds and holdout", func() error {
			_, err := SweepPenalty(ctx, s, set, []float64{1}, SweepOptions{Folds: 3, Holdout: 0.2})
			return err
		}},
		{"holdout 2", func() error { _, err := SweepPenalty(ctx, s, set, []float64{1}, SweepOptions{Holdout: 2}); return err }},
		{"units without hidden layer", func() error { _, err := SweepUnits(ctx, s, set, []int{2}, SweepOptions{}); return err }},
		{"nil set", func() error { _, err := SweepPenalty(ctx, s, nil, []float64{1}, SweepOptions{}); return err }},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			assert.ErrorIs(t, tt.run(), ErrOptions)
		})
	}
	// More folds than rows: data.Folds's own error, wrapped.
	_, err := SweepPenalty(ctx, s, set.Subset([]int{0, 1, 2}), []float64{1}, SweepOptions{Folds: 5})
	assert.ErrorIs(t, err, data.ErrFolds, "5 folds of 3 rows")
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	_, err = SweepPenalty(cctx, s, set, []float64{1}, SweepOptions{})
	assert.ErrorIs(t, err, context.Canceled, "cancelled")
}

// TestStatOf checks mean and SD against gonum's stat.MeanStdDev (sample
// SD, divisor n − 1).
func TestStatOf(t *testing.T) {
	v := []float64{0.3, 0.1, 0.7, 0.25}
	st := statOf(v)
	mean, sd := stat.MeanStdDev(v, nil)
	// Same formulas in a different order of summation: a few ulps.
	assert.InDelta(t, mean, st.Mean, 1e-15, "statOf mean, against gonum")
	assert.InDelta(t, sd, st.SD, 1e-15, "statOf SD, against gonum")
	assert.Equal(t, 0.1, st.Min, "range min")
	assert.Equal(t, 0.7, st.Max, "range max")
}
