package diag

import (
	"context"
	"math"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// TestLearningCurveTriage: on the synthetic triage demo the learning curve
// has the usual shape (common practice): training cost rises and holdout
// cost falls as rows are added, since a small subset is easy to fit and a
// poor guide to new rows. The trend is asserted between the smallest and
// the largest size only, not step by step.
//
// The penalty per row is held at the spec's full-data value (the default of
// CurveOptions). With the spec's λ (3.0 when measured) applied as written to
// every subset, λ/(2m) is ten times stronger at the smallest of 10 sizes
// than at the largest, and the training cross-entropy then falls with m
// instead (measured with seine curve -spec-penalty: 0.188 nats at 225
// rows, 0.109 at 2250).
func TestLearningCurveTriage(t *testing.T) {
	f, err := os.Open("../examples/triage/triage.yaml")
	require.NoError(t, err)
	s, err := spec.Parse(f)
	f.Close()
	require.NoError(t, err)
	f, err = os.Open("../examples/triage/sessions.csv")
	require.NoError(t, err)
	set, err := data.ReadCSV(f, data.CSVOptions{Columns: encode.ColumnsFor(s), MissingTokens: s.MissingTokens, Classes: s.Output.Classes})
	f.Close()
	require.NoError(t, err)
	c, err := LearningCurve(context.Background(), s, set, CurveOptions{Steps: 3, Limits: optim.Limits{Iterations: 200}})
	require.NoError(t, err)
	for _, p := range c.Points {
		t.Logf("%4d rows: train %.4f holdout %.4f", p.Rows, p.TrainCost, p.HoldoutCost)
	}
	// 3000 rows, holdout 0.25: 750 held out, 2250 for training, sizes
	// round(i·2250/3) = 750, 1500, 2250.
	require.Equal(t, 750, c.HoldoutRows, "holdout rows")
	require.Len(t, c.Points, 3, "points %+v", c.Points)
	require.Equal(t, 750, c.Points[0].Rows, "rows of the first point")
	require.Equal(t, 2250, c.Points[2].Rows, "rows of the last point")
	first, last := c.Points[0], c.Points[2]
	assert.Greater(t, last.TrainCost, first.TrainCost, "training cost did not rise: %.4f at %d rows, %.4f at %d", first.TrainCost, first.Rows, last.TrainCost, last.Rows)
	assert.Less(t, last.HoldoutCost, first.HoldoutCost, "holdout cost did not fall: %.4f at %d rows, %.4f at %d", first.HoldoutCost, first.Rows, last.HoldoutCost, last.Rows)
	// The classes of the triage demo have unequal shares, so the
	// baseline lies below ln 5 (the cross-entropy of a uniform guess over
	// five classes; common practice) and above 0.
	assert.Greater(t, c.Baseline, 0.0, "baseline outside (0, ln 5)")
	assert.Less(t, c.Baseline, math.Log(5), "baseline outside (0, ln 5)")
}

// TestBaselineIris: with equal class shares the baseline is the
// cross-entropy of a uniform guess, ln K (common practice); iris has 50
// rows of each of 3 classes, and a stratified split keeps the shares.
func TestBaselineIris(t *testing.T) {
	set := readSet(t, "iris.csv")
	tr, ho, err := data.Split(set, 0.2, 1)
	require.NoError(t, err)
	// ln 3 exactly up to the rounding of a mean of 30 equal logs.
	assert.InDelta(t, math.Log(3), baseline(tr, ho), 1e-12, "baseline, want ln 3")
}

// TestStratifiedOrder: every prefix of k rows holds each class c close to
// its share k·n_c/n. Derivation of the bound: with the threshold t of the
// prefix, class c contributes round(t·n_c) rows (keys (r + ½)/n_c), within
// ½ of t·n_c; summing over C classes, k is within C/2 of t·n, so
// |count_c − k·n_c/n| ≤ ½ + (C/2)·n_c/n ≤ ½ + C/2.
func TestStratifiedOrder(t *testing.T) {
	set := readSet(t, "wdbc.csv") // 212 and 357 rows
	order := stratifiedOrder(set, 5)
	labels := set.Labels()
	counts := set.Counts()
	n := float64(set.Rows())
	seen := make([]bool, set.Rows())
	got := make([]int, len(counts))
	bound := 0.5 + float64(len(counts))/2
	for k, row := range order {
		require.False(t, seen[row], "row %d twice", row)
		seen[row] = true
		got[labels[row]]++
		for c, nc := range counts {
			want := float64(k+1) * float64(nc) / n
			d := math.Abs(float64(got[c]) - want)
			require.LessOrEqual(t, d, bound, "prefix %d: class %d has %d rows, share says %.2f", k+1, c, got[c], want)
		}
	}
	require.Len(t, order, set.Rows(), "rows of the order")
	again := stratifiedOrder(set, 5)
	require.Equal(t, order, again, "same seed, different order")
}

// TestShapeOf checks the documented rules on hand-made curves (B = 1).
func TestShapeOf(t *testing.T) {
	pt := func(tr, ho float64) CurvePoint { return CurvePoint{TrainCost: tr, HoldoutCost: ho} }
	tests := []struct {
		name string
		pts  []CurvePoint
		want Shape
	}{
		{"wide gap at both", []CurvePoint{pt(0.01, 0.5), pt(0.05, 0.4), pt(0.1, 0.35)}, HighVariance},
		{"gap closes at the end", []CurvePoint{pt(0.05, 0.4), pt(0.2, 0.3)}, NoClearSign},
		{"both high and close", []CurvePoint{pt(0.6, 0.8), pt(0.65, 0.7)}, HighBias},
		{"both low and close", []CurvePoint{pt(0.1, 0.2), pt(0.12, 0.14)}, NoClearSign},
		{"one point, wide", []CurvePoint{pt(0.1, 0.5)}, HighVariance},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			assert.Equal(t, tt.want, shapeOf(tt.pts, 1))
		})
	}
}

func TestLearningCurveErrors(t *testing.T) {
	s := parseSpec(t, irisLogistic)
	set := readSet(t, "iris.csv")
	ctx := context.Background()
	tests := []struct {
		name string
		cfg  CurveOptions
	}{
		{"negative steps", CurveOptions{Steps: -1}},
		{"holdout 1.5", CurveOptions{Holdout: 1.5}},
		{"500 steps", CurveOptions{Steps: 500}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := LearningCurve(ctx, s, set, tt.cfg)
			assert.ErrorIs(t, err, ErrOptions, "%+v", tt.cfg)
		})
	}
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	_, err := LearningCurve(cctx, s, set, CurveOptions{})
	assert.ErrorIs(t, err, context.Canceled, "cancelled")
}
