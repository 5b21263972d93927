package diag

import (
	"errors"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestMergePartError: an error of MergeSweeps, MergeCurves or
// MergeComparisons that blames one part is a *PartError (errors.As) with
// the part's index, wraps ErrOptions, and Named calls the parts it
// mentions by the names given. The parts are made by hand: two shards of
// two fits, then spoilt.
func TestMergePartError(t *testing.T) {
	sweepPart := func(k int) *Sweep {
		return &Sweep{Param: PenaltyL2, Folds: 1, Size: 2, Shard: Shard{k, 2},
			Fits: []SweepFit{{Index: k, Value: k, Lambda: float64(k)}}}
	}
	curvePart := func(k int) *Curve {
		return &Curve{Steps: 2, Shard: Shard{k, 2}, Points: []CurvePoint{{Step: k + 1, Rows: 10 * (k + 1)}}}
	}
	comparePart := func(k int) *Comparison {
		seeds := []uint64{7, 8}
		return &Comparison{Methods: []string{"gd"}, Seeds: seeds, Target: 0.01, Shard: Shard{k, 2},
			Runs: [][]Run{{{Method: "gd", Seed: seeds[k]}}}}
	}
	files := []string{"a.json", "b.json", "c.json"}
	for _, tt := range []struct {
		name  string
		merge func() error
		part  int
		want  string // the message
		named string // the message from Named with files
	}{
		{
			name: "sweep: part holds too few fits",
			merge: func() error {
				b := sweepPart(1)
				b.Fits = nil
				_, err := MergeSweeps([]*Sweep{sweepPart(0), b})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 (shard 1/2) holds 0 fits, want 1",
			named: "diag: bad configuration: b.json (shard 1/2) holds 0 fits, want 1",
		},
		{
			name: "sweep: another sweep than part 0",
			merge: func() error {
				b := sweepPart(1)
				b.Holdout = 0.25
				_, err := MergeSweeps([]*Sweep{sweepPart(0), b})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 is a sweep of l2 over 2 fits (1 folds, holdout 0.25), part 0 of l2 over 2 (1 folds, holdout 0)",
			named: "diag: bad configuration: b.json is a sweep of l2 over 2 fits (1 folds, holdout 0.25), a.json of l2 over 2 (1 folds, holdout 0)",
		},
		{
			name: "sweep: folds that do not divide the fits",
			merge: func() error {
				a := sweepPart(0)
				a.Folds = 3
				_, err := MergeSweeps([]*Sweep{a, sweepPart(1)})
				return err
			},
			part:  0,
			want:  "diag: bad configuration: part 0: 2 fits in folds of 3",
			named: "diag: bad configuration: a.json: 2 fits in folds of 3",
		},
		{
			name: "sweep: a fit that does not belong",
			merge: func() error {
				b := sweepPart(1)
				b.Fits[0].Fold = 1
				_, err := MergeSweeps([]*Sweep{sweepPart(0), b})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 (shard 1/2): fit 1 (value 1, fold 1) does not belong there or is given twice",
			named: "diag: bad configuration: b.json (shard 1/2): fit 1 (value 1, fold 1) does not belong there or is given twice",
		},
		{
			name: "sweep: a shard twice",
			merge: func() error {
				_, err := MergeSweeps([]*Sweep{sweepPart(1), sweepPart(0), sweepPart(1)})
				return err
			},
			part:  2,
			want:  "diag: bad configuration: part 2 is shard 1/2, as is part 0",
			named: "diag: bad configuration: c.json is shard 1/2, as is a.json",
		},
		{
			name: "curve: a step that does not belong",
			merge: func() error {
				b := curvePart(1)
				b.Points[0].Step = 1
				_, err := MergeCurves([]*Curve{curvePart(0), b})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 (shard 1/2): step 1 does not belong there or is given twice",
			named: "diag: bad configuration: b.json (shard 1/2): step 1 does not belong there or is given twice",
		},
		{
			name: "curve: another curve than part 0",
			merge: func() error {
				b := curvePart(0)
				b.Baseline = 0.5
				_, err := MergeCurves([]*Curve{curvePart(1), b})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 is a curve of 2 steps, 0 holdout rows, baseline 0.5; part 0 of 2, 0, 0",
			named: "diag: bad configuration: b.json is a curve of 2 steps, 0 holdout rows, baseline 0.5; a.json of 2, 0, 0",
		},
		{
			name: "curve: no steps",
			merge: func() error {
				_, err := MergeCurves([]*Curve{{Shard: Shard{0, 1}}})
				return err
			},
			part:  0,
			want:  "diag: bad configuration: part 0: 0 steps, want ≥ 1",
			named: "diag: bad configuration: a.json: 0 steps, want ≥ 1",
		},
		{
			name: "curve: part holds too many points",
			merge: func() error {
				b := curvePart(1)
				b.Points = append(b.Points, b.Points[0])
				_, err := MergeCurves([]*Curve{curvePart(0), b})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 (shard 1/2) holds 2 points, want 1",
			named: "diag: bad configuration: b.json (shard 1/2) holds 2 points, want 1",
		},
		{
			name: "comparison: no methods",
			merge: func() error {
				_, err := MergeComparisons([]*Comparison{{Seeds: []uint64{7}, Shard: Shard{0, 1}}})
				return err
			},
			part:  0,
			want:  "diag: bad configuration: part 0 has 0 methods and 1 seeds",
			named: "diag: bad configuration: a.json has 0 methods and 1 seeds",
		},
		{
			name: "comparison: runs of too few methods",
			merge: func() error {
				c := comparePart(1)
				c.Runs = nil
				_, err := MergeComparisons([]*Comparison{comparePart(0), c})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 has runs of 0 methods, want 1",
			named: "diag: bad configuration: b.json has runs of 0 methods, want 1",
		},
		{
			name: "comparison: part holds too few runs",
			merge: func() error {
				c := comparePart(1)
				c.Runs[0] = nil
				_, err := MergeComparisons([]*Comparison{comparePart(0), c})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 (shard 1/2) holds 0 runs, want 1",
			named: "diag: bad configuration: b.json (shard 1/2) holds 0 runs, want 1",
		},
		{
			name: "comparison: another comparison than part 0",
			merge: func() error {
				c := comparePart(1)
				c.Target = 0.02
				_, err := MergeComparisons([]*Comparison{comparePart(0), c})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 is another comparison than part 0 (methods, seeds, target, rows, batch or warnings differ)",
			named: "diag: bad configuration: b.json is another comparison than a.json (methods, seeds, target, rows, batch or warnings differ)",
		},
		{
			name: "comparison: a run that does not belong",
			merge: func() error {
				c := comparePart(1)
				c.Runs[0][0].Seed = 7
				_, err := MergeComparisons([]*Comparison{comparePart(0), c})
				return err
			},
			part:  1,
			want:  "diag: bad configuration: part 1 (shard 1/2): run of gd from seed 7 does not belong there or is given twice",
			named: "diag: bad configuration: b.json (shard 1/2): run of gd from seed 7 does not belong there or is given twice",
		},
		{
			name: "comparison: a nil part",
			merge: func() error {
				_, err := MergeComparisons([]*Comparison{comparePart(0), comparePart(1), nil})
				return err
			},
			part:  2,
			want:  "diag: bad configuration: part 2 is nil",
			named: "diag: bad configuration: c.json is nil",
		},
	} {
		t.Run(tt.name, func(t *testing.T) {
			err := tt.merge()
			require.Error(t, err)
			var pe *PartError
			require.True(t, errors.As(err, &pe), "errors.As finds no *PartError in %v", err)
			assert.Equal(t, tt.part, pe.Part, "the part blamed")
			assert.ErrorIs(t, err, ErrOptions)
			assert.Equal(t, tt.want, err.Error())
			assert.Equal(t, tt.named, pe.Named(func(i int) string { return files[i] }))
		})
	}
}

// TestMergeErrorNoPart: an error that blames no one part (a shard
// missing) is no *PartError.
func TestMergeErrorNoPart(t *testing.T) {
	part := &Curve{Steps: 2, Shard: Shard{0, 2}, Points: []CurvePoint{{Step: 1}}}
	_, err := MergeCurves([]*Curve{part})
	require.Error(t, err)
	assert.ErrorIs(t, err, ErrOptions)
	var pe *PartError
	assert.False(t, errors.As(err, &pe), "%v", err)
	assert.Equal(t, "diag: bad configuration: shard 1/2 is missing", err.Error())
}
