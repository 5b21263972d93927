package diag

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// irisHidden is a small net with a hidden layer, so that units can vary.
const irisHidden = `version: 1
inputs: 4
hidden:
  - units: 3
    activation: tanh
output:
  classes: [setosa, versicolor, virginica]
penalty:
  l2: 0.5
`

// shards runs run once per shard of n and returns the parts.
func shards[T any](t *testing.T, n int, run func(Shard) (T, error)) []T {
	t.Helper()
	var parts []T
	// Shards in reverse, so that the merge cannot depend on their order.
	for k := n - 1; k >= 0; k-- {
		p, err := run(Shard{K: k, N: n})
		require.NoError(t, err, "shard %d/%d", k, n)
		parts = append(parts, p)
	}
	return parts
}

// TestShardCount: the fits i in [0, size) with i mod N = K, counted by
// brute force (the definition).
func TestShardCount(t *testing.T) {
	for size := range 12 {
		for n := 1; n <= 8; n++ {
			for k := range n {
				want := 0
				for i := range size {
					if i%n == k {
						want++
					}
				}
				assert.Equal(t, want, Shard{k, n}.Count(size), "size %d shard %d/%d", size, k, n)
			}
		}
		assert.Equal(t, size, Shard{}.Count(size))
	}
}

// The shards of a sweep, merged, give the whole sweep bit for bit: every
// fit depends only on its own spec, rows and seed (the definition of
// Shard), and the summary is computed from the fits in one order. The
// progress callback sees every fit once, in order, and changes nothing.
func TestSweepShardsMerge(t *testing.T) {
	set := readSet(t, "iris.csv")
	s := parseSpec(t, irisHidden)
	lambdas := []float64{0, 0.1, 1}
	cfg := SweepOptions{Folds: 3, Limits: optim.Limits{Iterations: 15}}
	var seen []FitDone
	withProgress := cfg
	withProgress.Progress = func(f FitDone) { seen = append(seen, f) }
	whole, err := SweepPenalty(context.Background(), s, set, lambdas, withProgress)
	require.NoError(t, err)
	require.Len(t, seen, 9)
	for i, f := range seen {
		assert.Equal(t, i, f.Index)
		assert.Equal(t, i+1, f.Done)
		assert.Equal(t, 9, f.Total)
		assert.Equal(t, lambdas[i/3], f.Lambda)
		assert.Equal(t, i%3, f.Fold)
		assert.Equal(t, 3, f.Folds)
		assert.Equal(t, 100, f.Rows) // 150 rows, 3 stratified folds of 50
	}
	for _, n := range []int{1, 2, 4, 11} {
		parts := shards(t, n, func(sh Shard) (*Sweep, error) {
			c := cfg
			c.Shard = sh
			return SweepPenalty(context.Background(), s, set, lambdas, c)
		})
		merged, err := MergeSweeps(parts)
		require.NoError(t, err, "N = %d", n)
		assert.Equal(t, whole, merged, "N = %d", n) // compares float64 by ==; NaN-free here
	}
	units, err := SweepUnits(context.Background(), s, set, []int{1, 2}, SweepOptions{Holdout: 0.3, Limits: optim.Limits{Iterations: 10}})
	require.NoError(t, err)
	parts := shards(t, 2, func(sh Shard) (*Sweep, error) {
		return SweepUnits(context.Background(), s, set, []int{1, 2}, SweepOptions{Holdout: 0.3, Limits: optim.Limits{Iterations: 10}, Shard: sh})
	})
	merged, err := MergeSweeps(parts)
	require.NoError(t, err)
	assert.Equal(t, units, merged)
}

func TestCurveShardsMerge(t *testing.T) {
	set := readSet(t, "iris.csv")
	s := parseSpec(t, irisHidden)
	cfg := CurveOptions{Steps: 4, Limits: optim.Limits{Iterations: 15}}
	var seen []FitDone
	withProgress := cfg
	withProgress.Progress = func(f FitDone) { seen = append(seen, f) }
	whole, err := LearningCurve(context.Background(), s, set, withProgress)
	require.NoError(t, err)
	require.Len(t, seen, 4)
	for i, f := range seen {
		assert.Equal(t, FitDone{Index: i, Done: i + 1, Total: 4, Lambda: f.Lambda, Units: 3, Rows: whole.Points[i].Rows, Elapsed: f.Elapsed}, f)
	}
	for _, n := range []int{1, 3, 5} {
		parts := shards(t, n, func(sh Shard) (*Curve, error) {
			c := cfg
			c.Shard = sh
			return LearningCurve(context.Background(), s, set, c)
		})
		merged, err := MergeCurves(parts)
		require.NoError(t, err, "N = %d", n)
		assert.Equal(t, whole, merged, "N = %d", n)
	}
}

// Comparisons hold NaN (holdout figures without a holdout) and times, so
// they are compared figure by figure with the times left out.
func TestCompareShardsMerge(t *testing.T) {
	set := readSet(t, "iris.csv")
	s := parseSpec(t, irisHidden)
	cfg := CompareOptions{
		Optimizers: []spec.Optimizer{spec.GD, spec.LBFGS, spec.Adam}, Seeds: 2, Holdout: 0.2,
		Limits: optim.Limits{Iterations: 12},
	}
	var seen []FitDone
	withProgress := cfg
	withProgress.Progress = func(f FitDone) { seen = append(seen, f) }
	whole, err := Compare(context.Background(), s, set, withProgress)
	require.NoError(t, err)
	require.Len(t, seen, 6)
	assert.Equal(t, "lbfgs", seen[4].Method)
	assert.Equal(t, whole.Seeds[1], seen[4].Seed)
	for _, n := range []int{1, 2, 4, 7} {
		parts := shards(t, n, func(sh Shard) (*Comparison, error) {
			c := cfg
			c.Shard = sh
			return Compare(context.Background(), s, set, c)
		})
		merged, err := MergeComparisons(parts)
		require.NoError(t, err, "N = %d", n)
		assert.Equal(t, noTimes(whole), noTimes(merged), "N = %d", n)
	}
}

// noTimes returns a copy of c with every wall time set to 0 and NaN
// replaced by a marker, so that assert.Equal compares the rest exactly.
func noTimes(c *Comparison) *Comparison {
	d := *c
	nan := func(x *float64) {
		if math.IsNaN(*x) {
			*x = -12345
		}
	}
	d.Runs = make([][]Run, len(c.Runs))
	for i := range c.Runs {
		for _, r := range c.Runs[i] {
			r.Elapsed, r.SecondsToTarget = 0, 0
			nan(&r.HoldoutCost)
			nan(&r.HoldoutAccuracy)
			tr := make([]TracePoint, len(r.Trace))
			for j, tp := range r.Trace {
				tp.Elapsed = 0
				nan(&tp.HoldoutCost)
				nan(&tp.HoldoutAccuracy)
				tr[j] = tp
			}
			r.Trace = tr
			d.Runs[i] = append(d.Runs[i], r)
		}
	}
	d.Summary = make([]MethodSummary, len(c.Summary))
	for i, m := range c.Summary {
		m.Seconds, m.SecondsToTarget = Spread{}, Spread{}
		for _, sp := range []*Spread{&m.Cost, &m.Evaluations, &m.Iterations, &m.EvalsToTarget, &m.HoldoutAccuracy} {
			nan(&sp.Median)
			nan(&sp.Min)
			nan(&sp.Max)
		}
		d.Summary[i] = m
	}
	return &d
}

func TestMergeErrors(t *testing.T) {
	set := readSet(t, "iris.csv")
	s := parseSpec(t, irisHidden)
	run := func(lambdas []float64, sh Shard) *Sweep {
		sw, err := SweepPenalty(context.Background(), s, set, lambdas, SweepOptions{Folds: 2, Limits: optim.Limits{Iterations: 2}, Shard: sh})
		require.NoError(t, err)
		return sw
	}
	a, b, c := run([]float64{0, 1}, Shard{0, 3}), run([]float64{0, 1}, Shard{1, 3}), run([]float64{0, 1}, Shard{2, 3})
	other := run([]float64{0, 1, 2}, Shard{2, 3})
	for _, tt := range []struct {
		name  string
		parts []*Sweep
		want  string
	}{
		{"none", nil, "no parts"},
		{"missing", []*Sweep{a, c}, "shard 1/3 is missing"},
		{"twice", []*Sweep{a, b, b, c}, "part 2 is shard 1/3, as is part 1"},
		{"another sweep", []*Sweep{a, b, other}, "part 2 is a sweep"},
		{"another N", []*Sweep{a, b, run([]float64{0, 1}, Shard{1, 2})}, "part 2 is shard 1/2, part 0 is one of 3"},
		{"whole", []*Sweep{run([]float64{0, 1}, Shard{})}, "part 0 is a whole run"},
		{"negative N", []*Sweep{{Shard: Shard{0, -1}}}, "part 0: shard 0/-1"}, // a hand-made part: no panic
		{"nil part", []*Sweep{a, nil}, "part 1 is nil"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			_, err := MergeSweeps(tt.parts)
			require.Error(t, err)
			assert.True(t, errors.Is(err, ErrOptions))
			assert.Contains(t, err.Error(), tt.want)
		})
	}
	for _, sh := range []Shard{{3, 3}, {0, 0 - 1}, {-1, 2}, {1, 0}} {
		_, err := SweepPenalty(context.Background(), s, set, []float64{1}, SweepOptions{Shard: sh})
		assert.ErrorIs(t, err, ErrOptions, "shard %v", sh)
	}
}
