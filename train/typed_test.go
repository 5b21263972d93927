package train

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/internal/fit"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
)

// readTyped reads one of the open data sets with missing values kept in
// package data's testdata (see data/testdata/SOURCE.md) for the spec s.
func readTyped(t *testing.T, file string, s *spec.Network) *data.Set {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "data", "testdata", file))
	require.NoError(t, err)
	defer f.Close()
	set, err := data.ReadCSV(f, data.CSVOptions{Classes: s.Output.Classes, Columns: encode.ColumnsFor(s), MissingTokens: s.MissingTokens})
	require.NoError(t, err)
	return set
}

// crossValidate trains s on k−1 of 5 stratified folds and scores the held
// out fold, for each fold, and returns the accuracy over all rows.
func crossValidate(t *testing.T, s *spec.Network, set *data.Set) float64 {
	t.Helper()
	folds, err := data.Folds(set, 5, 11)
	require.NoError(t, err)
	right := 0
	for k := range folds {
		tr, va := set.Subset(data.TrainRows(folds, k)), set.Subset(folds[k])
		res, err := Train(context.Background(), s, tr, Options{})
		require.NoError(t, err)
		p, err := res.Model.ProbabilitiesSet(va)
		require.NoError(t, err)
		acc := score.Accuracy(p, va.Y, false)
		right += int(math.Round(acc * float64(va.Rows())))
	}
	return float64(right) / float64(set.Rows())
}

// typedSpec is a small net over the named inputs, each with the given
// input text (a YAML mapping body, or "" for a bare number).
func typedSpec(t *testing.T, names []string, input func(name string) string, classes string) *spec.Network {
	var b strings.Builder
	b.WriteString("version: 1\ninputs:\n")
	for _, n := range names {
		if in := input(n); in != "" {
			fmt.Fprintf(&b, "  - name: %s\n    %s\n", n, in)
		} else {
			fmt.Fprintf(&b, "  - %s\n", n)
		}
	}
	fmt.Fprintf(&b, "hidden:\n  - units: 8\n    activation: tanh\noutput:\n  classes: [%s]\n  activation: softmax\n", classes)
	b.WriteString("penalty:\n  l2: 1\ninit:\n  seed: 3\ntrain:\n  optimizer: lbfgs\n  iterations: 200\n")
	return parseSpec(t, b.String())
}

var voteNames = []string{"handicapped-infants", "water-project-cost-sharing", "adoption-of-the-budget-resolution",
	"physician-fee-freeze", "el-salvador-aid", "religious-groups-in-schools", "anti-satellite-test-ban",
	"aid-to-nicaraguan-contras", "mx-missile", "immigration", "synfuels-corporation-cutback", "education-spending",
	"superfund-right-to-sue", "crime", "duty-free-exports", "export-administration-act-south-africa"}

// UCI Congressional Voting Records (Schlimmer 1987; data/testdata/votes.csv):
// 16 category inputs with `?` cells. Over 5 stratified folds the accuracy
// must reach 0.93 with `?` as a level of its own and with the mode filled in.
// For scale: scikit-learn's multilayer classifier with one-hot encoding and mode
// imputation reaches 0.956 on this file (measured, as the issue reports);
// 0.93 leaves about 1.3 binomial standard deviations of 435 rows
// (√(0.95·0.05/435) ≈ 0.010) twice over for a different net and optimizer.
func TestVotesCrossValidated(t *testing.T) {
	if testing.Short() {
		t.Skip("trains ten nets")
	}
	for _, rule := range []string{"level", "mode"} {
		t.Run(rule, func(t *testing.T) {
			s := typedSpec(t, voteNames, func(string) string { return "type: category\n    missing: " + rule }, "democrat, republican")
			set := readTyped(t, "votes.csv", s)
			acc := crossValidate(t, s, set)
			t.Logf("votes, missing: %s: 5-fold accuracy %.4f", rule, acc)
			assert.GreaterOrEqual(t, acc, 0.93)
		})
	}
}

// UCI Breast Cancer Wisconsin, Original (Wolberg & Mangasarian 1990;
// data/testdata/breast-cancer-wisconsin.csv): nine scores, 16 `?` cells in
// bare_nuclei filled by the training median; `id` is in the file but not an
// input. 5-fold accuracy must reach 0.95 (scikit-learn's multilayer classifier with median
// imputation: 0.959, measured, as the issue reports).
func TestBreastCancerCrossValidated(t *testing.T) {
	if testing.Short() {
		t.Skip("trains five nets")
	}
	names := []string{"clump_thickness", "cell_size_uniformity", "cell_shape_uniformity", "marginal_adhesion",
		"epithelial_cell_size", "bare_nuclei", "bland_chromatin", "normal_nucleoli", "mitoses"}
	s := typedSpec(t, names, func(n string) string {
		if n == "bare_nuclei" {
			return "missing: median"
		}
		return ""
	}, "benign, malignant")
	set := readTyped(t, "breast-cancer-wisconsin.csv", s)
	acc := crossValidate(t, s, set)
	t.Logf("breast-cancer-wisconsin, missing: median: 5-fold accuracy %.4f", acc)
	assert.GreaterOrEqual(t, acc, 0.95)
}

// The encoder is fitted on the training rows only: a holdout whose column
// holds extreme values (and a level never seen in training) leaves the fill
// value, the scaling and the levels as the training rows alone give them.
func TestEncoderIgnoresHoldout(t *testing.T) {
	s := parseSpec(t, `
version: 1
inputs:
  - name: x
    missing: mean
  - name: c
    type: category
    unknown: ignore
output:
  classes: [a, b]
train:
  iterations: 5
`)
	texts := [][]string{nil, {"p", "q", "never-in-training"}}
	row := func(x, c float64, class int) []float64 { return []float64{x, c, float64(class)} }
	rows := [][]float64{row(1, 0, 0), row(2, 1, 1), row(math.NaN(), 0, 0), row(3, 1, 1), row(4, 0, 0), row(5, 1, 1)}
	hold := [][]float64{row(1e300, 2, 0), row(-1e300, 2, 1), row(math.NaN(), 1, 0)}
	mk := func(rs [][]float64) *data.Set {
		x := mat.NewDense(len(rs), 2, nil)
		y := mat.NewDense(len(rs), 2, nil)
		for i, r := range rs {
			x.Set(i, 0, r[0])
			x.Set(i, 1, r[1])
			y.Set(i, int(r[2]), 1)
		}
		return &data.Set{X: x, Y: y, Texts: texts, Features: []string{"x", "c"}, Classes: []string{"a", "b"}}
	}
	res, err := Train(context.Background(), s, mk(rows), Options{Holdout: mk(hold), Limits: optim.Limits{Iterations: 5}})
	require.NoError(t, err)
	in := res.Model.Encoder().Inputs()
	// Training values 1, 2, 3, 4, 5 (one missing): mean 3; filled column
	// 1, 2, 3, 3, 4, 5 has mean 3 and sample SD √(10/5) = √2.
	assert.Equal(t, 3.0, in[0].Fill)
	assert.Equal(t, 3.0, in[0].Mean)
	assert.InDelta(t, math.Sqrt2, in[0].Scale, 1e-15)
	assert.Equal(t, []string{"p", "q"}, in[1].Levels)
	assert.Equal(t, []string{"p", "q"}, res.Model.Spec().Types[1].Levels, "the model's spec holds the learned levels")
	assert.Equal(t, 1+2, res.Model.Net().Inputs())
}

// The warnings of a run on degenerate data: a class with three training
// rows, more params than rows, and an iteration limit reached far from a
// minimum.
func TestFitWarnings(t *testing.T) {
	s := parseSpec(t, `
version: 1
inputs: 2
hidden:
  - units: 20
    activation: tanh
output:
  classes: [a, b]
penalty:
  l2: 0
`)
	x := mat.NewDense(23, 2, nil)
	y := mat.NewDense(23, 2, nil)
	for i := range 23 {
		c := 0
		if i < 3 {
			c = 1
		}
		x.Set(i, 0, float64(i%7))
		x.Set(i, 1, float64(c)+0.1*float64(i%3))
		y.Set(i, c, 1)
	}
	set := &data.Set{X: x, Y: y, Classes: []string{"a", "b"}, Features: []string{"u", "v"}}
	res, err := Train(context.Background(), s, set, Options{Limits: optim.Limits{Iterations: 2}})
	require.NoError(t, err)
	all := strings.Join(res.Warnings, "\n")
	for _, w := range []string{`class "b" has only 3 training rows`, "the net has 102 params for 23 training rows", "stopped at the iteration limit (2)"} {
		assert.Contains(t, all, w)
	}
}

// Balanced class weights on a rare class (issue 11): WDBC (Street, Wolberg
// & Mangasarian 1993; testdata/wdbc.csv) reduced to all 357 benign rows and
// the first 18 malignant ones in file order (4.8% positives), on three of
// its weaker features with a strong penalty, so that an unweighted net
// leans on the prior and misses most malignant rows. Over 5 stratified
// folds, the pooled recall of the rare class must rise by at least 0.2 with
// `class_weights: balanced` (w = m/(K·m_k): about 10.4 for malignant).
func TestBalancedWeightsRaiseRareRecall(t *testing.T) {
	specText := func(weights string) string {
		return `
version: 1
inputs: [texture_mean, smoothness_mean, symmetry_mean]
hidden:
  - units: 4
    activation: tanh
output:
  classes: [benign, malignant]
  activation: sigmoid
penalty:
  l2: 20
init:
  seed: 2
train:
  iterations: 200
` + weights
	}
	plain := parseSpec(t, specText(""))
	weighted := parseSpec(t, specText("  class_weights: balanced\n"))
	f, err := os.Open(filepath.Join("testdata", "wdbc.csv"))
	require.NoError(t, err)
	defer f.Close()
	all, err := data.ReadCSV(f, data.CSVOptions{Classes: plain.Output.Classes, Columns: encode.ColumnsFor(plain)})
	require.NoError(t, err)
	var rows []int
	malignant := 0
	for i, k := range all.Labels() {
		if k == 0 || malignant < 18 {
			rows = append(rows, i)
			malignant += k
		}
	}
	set := all.Subset(rows)
	require.Equal(t, []int{357, 18}, set.Counts())

	recall := func(s *spec.Network) float64 {
		folds, err := data.Folds(set, 5, 3)
		require.NoError(t, err)
		tp, pos := 0, 0
		for k := range folds {
			res, err := Train(context.Background(), s, set.Subset(data.TrainRows(folds, k)), Options{})
			require.NoError(t, err)
			va := set.Subset(folds[k])
			p, err := res.Model.ProbabilitiesSet(va)
			require.NoError(t, err)
			for i, c := range va.Labels() {
				if c == 1 {
					pos++
					if p.At(i, 1) > p.At(i, 0) {
						tp++
					}
				}
			}
		}
		return float64(tp) / float64(pos)
	}
	r0, r1 := recall(plain), recall(weighted)
	t.Logf("rare-class recall: unweighted %.3f, balanced %.3f", r0, r1)
	assert.GreaterOrEqual(t, r1-r0, 0.2)

	w, _ := fit.ClassWeights(weighted, set)
	// w_k = m/(K·m_k) with m = 375 rows, K = 2, m_k = 357 and 18: one
	// rounding each, so the same float64 as the constants.
	assert.Equal(t, []float64{375.0 / (2 * 357), 375.0 / (2 * 18)}, w)
}
