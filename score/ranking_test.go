package score

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// golden is ranking_golden.json, written by ranking_golden.py with
// scikit-learn 1.2.1 / numpy 1.24.2 (Debian 12 python3-sklearn).
type golden struct {
	Library string `json:"library"`
	Hand    struct {
		Scores           []float64 `json:"scores"`
		Positive         []int     `json:"positive"`
		ROCAUC           float64   `json:"roc_auc"`
		AveragePrecision float64   `json:"average_precision"`
	} `json:"hand"`
	WDBC struct {
		Rows     int      `json:"rows"`
		Classes  []string `json:"classes"`
		PerClass []struct {
			Class            string    `json:"class"`
			ROCAUC           float64   `json:"roc_auc"`
			AveragePrecision float64   `json:"average_precision"`
			ROCFPR           []float64 `json:"roc_fpr"`
			ROCTPR           []float64 `json:"roc_tpr"`
			PRPrecision      []float64 `json:"pr_precision"`
			PRRecall         []float64 `json:"pr_recall"`
		} `json:"per_class"`
		MacroROCAUC           float64 `json:"macro_roc_auc"`
		MacroAveragePrecision float64 `json:"macro_average_precision"`
	} `json:"wdbc"`
}

func readGolden(t *testing.T) golden {
	t.Helper()
	b, err := os.ReadFile("testdata/ranking_golden.json")
	require.NoError(t, err)
	var g golden
	require.NoError(t, json.Unmarshal(b, &g))
	require.Contains(t, g.Library, "scikit-learn 1.2.1")
	return g
}

// The reference library and this package sum the same terms in
// different orders and forms ((TPₙ−TPₙ₋₁)/P against Rₙ−Rₙ₋₁; a
// trapezoid over rates against a pair count), so results may differ by a
// few rounding errors of size 2⁻⁵³ per term; 1e-12 allows for several
// hundred terms, as the issue asks.
const refTol = 1e-12

// A hand-worked example with ties: eight rows, P = 4 positive (+),
// N = 4 negative (−).
//
//	score  0.9  0.8  0.8  0.6  0.6  0.6  0.3  0.3
//	label   +    +    −    +    −    −    −    +
//
// Mann–Whitney (Mann & Whitney 1947; Hanley & McNeil 1982): for each
// positive, count the negatives scored lower plus one half per tie:
// 0.9 → 4; 0.8 → 3 + ½; 0.6 → 1 + 2·½; 0.3 → 0 + ½. U = 10, so
// AUC = U/(P·N) = 10/16 = 0.625.
//
// Thresholds (distinct scores, descending) with cumulative counts:
//
//	t     TP FP  FPR   TPR   precision
//	+Inf   0  0  0     0     —
//	0.9    1  0  0     0.25  1
//	0.8    2  1  0.25  0.5   2/3
//	0.6    3  3  0.75  0.75  1/2
//	0.3    4  4  1     1     1/2
//
// Trapezoid: 0.25·(0.25+0.5)/2 + 0.5·(0.5+0.75)/2 + 0.25·(0.75+1)/2
// = 0.09375 + 0.3125 + 0.21875 = 0.625, the same.
// AP = Σ (Rₙ − Rₙ₋₁)·Pₙ = 0.25·(1 + 2/3 + 1/2 + 1/2) = 2/3.
func TestRankingWorkedExample(t *testing.T) {
	scores := []float64{0.9, 0.8, 0.8, 0.6, 0.6, 0.6, 0.3, 0.3}
	pos := []bool{true, true, false, true, false, false, false, true}

	auc, err := ROCArea(scores, pos)
	require.NoError(t, err)
	assert.Equal(t, 0.625, auc) // 10/16 is exact in binary
	ap, err := AveragePrecision(scores, pos)
	require.NoError(t, err)
	assert.InDelta(t, 2.0/3, ap, 1e-15) // four terms, each within an ulp

	roc, err := ROCCurve(scores, pos)
	require.NoError(t, err)
	assert.Equal(t, []float64{math.Inf(1), 0.9, 0.8, 0.6, 0.3}, roc.Threshold)
	assert.Equal(t, []float64{0, 0, 0.25, 0.75, 1}, roc.FPR)
	assert.Equal(t, []float64{0, 0.25, 0.5, 0.75, 1}, roc.TPR)
	pr, err := PRCurve(scores, pos)
	require.NoError(t, err)
	assert.Equal(t, []float64{0.9, 0.8, 0.6, 0.3}, pr.Threshold)
	assert.Equal(t, []float64{0.25, 0.5, 0.75, 1}, pr.Recall)
	assert.Equal(t, []float64{1, 2.0 / 3, 0.5, 0.5}, pr.Precision)

	// The same figures from the reference library.
	g := readGolden(t)
	require.Equal(t, scores, g.Hand.Scores)
	for i, p := range g.Hand.Positive {
		require.Equal(t, pos[i], p == 1)
	}
	assert.InDelta(t, g.Hand.ROCAUC, auc, refTol)
	assert.InDelta(t, g.Hand.AveragePrecision, ap, refTol)
}

// readWDBC reads wdbc-probabilities.csv into P and one-hot Y.
func readWDBC(t *testing.T) (p, y *mat.Dense, classes []string) {
	t.Helper()
	f, err := os.Open("testdata/wdbc-probabilities.csv")
	require.NoError(t, err)
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	require.NoError(t, err)
	for _, h := range recs[0][1:] {
		classes = append(classes, strings.TrimPrefix(h, "p_"))
	}
	m, k := len(recs)-1, len(classes)
	p, y = mat.NewDense(m, k, nil), mat.NewDense(m, k, nil)
	for i, r := range recs[1:] {
		for j := range classes {
			v, err := strconv.ParseFloat(r[j+1], 64)
			require.NoError(t, err)
			p.Set(i, j, v)
			if r[0] == classes[j] {
				y.Set(i, j, 1)
			}
		}
	}
	return p, y, classes
}

// TestRankingWDBC compares the per-class and macro figures and the curve
// points on wdbc, scored by a model trained with seine, with the
// reference library's (see testdata/SOURCE.md).
func TestRankingWDBC(t *testing.T) {
	g := readGolden(t)
	p, y, classes := readWDBC(t)
	require.Equal(t, g.WDBC.Classes, classes)
	require.Equal(t, g.WDBC.Rows, p.RawMatrix().Rows)
	r, err := Rank(p, y, classes)
	require.NoError(t, err)
	require.Len(t, r.PerClass, 2)
	assert.Equal(t, 2, r.Counted)
	assert.Equal(t, 212, r.PerClass[0].Positives) // published class counts (SOURCE.md)
	assert.Equal(t, 357, r.PerClass[0].Negatives)
	for k, want := range g.WDBC.PerClass {
		got := r.PerClass[k]
		assert.Equal(t, want.Class, got.Name)
		assert.InDelta(t, want.ROCAUC, got.ROCAUC, refTol, want.Class)
		assert.InDelta(t, want.AveragePrecision, got.AveragePrecision, refTol, want.Class)
		if want.ROCFPR == nil {
			continue
		}
		assert.InDeltaSlice(t, want.ROCFPR, got.ROC.FPR, refTol)
		assert.InDeltaSlice(t, want.ROCTPR, got.ROC.TPR, refTol)
		assert.InDeltaSlice(t, want.PRPrecision, got.PR.Precision, refTol)
		assert.InDeltaSlice(t, want.PRRecall, got.PR.Recall, refTol)
	}
	assert.InDelta(t, g.WDBC.MacroROCAUC, r.MacroROCAUC, refTol)
	assert.InDelta(t, g.WDBC.MacroAveragePrecision, r.MacroAveragePrecision, refTol)
}

// TestROCAreaIsMannWhitney compares the area with the Mann–Whitney
// statistic counted pair by pair from its definition (Mann & Whitney
// 1947), on random scores drawn from only five values so that ties are
// frequent. Both are exact rationals rounded once, so they must be equal.
func TestROCAreaIsMannWhitney(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for trial := range 50 {
		n := 2 + rng.IntN(60)
		scores := make([]float64, n)
		pos := make([]bool, n)
		for i := range scores {
			scores[i] = float64(rng.IntN(5)) / 4
			pos[i] = rng.Float64() < 0.3
		}
		pos[0], pos[1] = true, false
		var u2, np, nn int
		for i := range n {
			if !pos[i] {
				nn++
				continue
			}
			np++
			for j := range n {
				if pos[j] {
					continue
				}
				switch {
				case scores[i] > scores[j]:
					u2 += 2
				case scores[i] == scores[j]:
					u2++
				}
			}
		}
		auc, err := ROCArea(scores, pos)
		require.NoError(t, err)
		require.Equal(t, float64(u2)/float64(2*np*nn), auc, "trial %d", trial)
	}
}

// A class with no positive rows (here "c") has NaN figures and is left
// out of the macro means. Class a is the worked example above; class b is
// its mirror (p_b = 1 − p_a, labels flipped), which orders the same pairs,
// so its area is again 10/16. Its AP, worked like a's:
//
//	t     rows   TP FP  recall  precision
//	0.7   + −     1  1  1/4     1/2
//	0.4   + + −   3  2  3/4     3/5
//	0.2   + −     4  3  1       4/7
//	0.1   −       4  4  1       1/2
//
// AP_b = ¼·½ + ½·⅗ + ¼·4/7 = 159/280.
func TestRankMissingClass(t *testing.T) {
	// Two classes of a softmax, so p_b = 1 − p_a and b's positives are
	// a's negatives; class c never occurs and has probability 0.
	sa := []float64{0.9, 0.8, 0.8, 0.6, 0.6, 0.6, 0.3, 0.3}
	la := []bool{true, true, false, true, false, false, false, true}
	m := len(sa)
	p, y := mat.NewDense(m, 3, nil), mat.NewDense(m, 3, nil)
	for i := range sa {
		p.Set(i, 0, sa[i])
		p.Set(i, 1, 1-sa[i])
		if la[i] {
			y.Set(i, 0, 1)
		} else {
			y.Set(i, 1, 1)
		}
	}
	r, err := Rank(p, y, []string{"a", "b", "c"})
	require.NoError(t, err)
	assert.Equal(t, 2, r.Counted)
	c := r.PerClass[2]
	assert.Equal(t, 0, c.Positives)
	assert.Equal(t, m, c.Negatives)
	assert.True(t, math.IsNaN(c.ROCAUC))
	assert.True(t, math.IsNaN(c.AveragePrecision))
	assert.Equal(t, 0.625, r.PerClass[0].ROCAUC)
	assert.Equal(t, 0.625, r.PerClass[1].ROCAUC)                        // U counts the same pairs
	assert.InDelta(t, 159.0/280, r.PerClass[1].AveragePrecision, 1e-15) // three terms, each within an ulp
	assert.Equal(t, 0.625, r.MacroROCAUC)
	assert.InDelta(t, (2.0/3+159.0/280)/2, r.MacroAveragePrecision, 1e-15)

	// No class with both: both macro means are NaN.
	one := mat.NewDense(2, 1, []float64{0.2, 0.7})
	r, err = Rank(one, mat.NewDense(2, 1, []float64{1, 1}), []string{"a"})
	require.NoError(t, err)
	assert.Equal(t, 0, r.Counted)
	assert.True(t, math.IsNaN(r.MacroROCAUC))
	assert.True(t, math.IsNaN(r.MacroAveragePrecision))
}

func TestRankingBadInput(t *testing.T) {
	_, err := ROCArea([]float64{0.1, math.NaN()}, []bool{true, false})
	assert.ErrorIs(t, err, ErrValue)
	assert.ErrorContains(t, err, "row 2")
	_, err = AveragePrecision([]float64{0.1}, []bool{true, false})
	assert.ErrorIs(t, err, ErrShape)
	_, err = PRCurve(nil, nil)
	assert.ErrorIs(t, err, ErrShape)
	_, err = Rank(mat.NewDense(2, 2, []float64{0.5, 0.5, 1.5, -0.5}), mat.NewDense(2, 2, []float64{1, 0, 0, 1}), []string{"a", "b"})
	assert.ErrorIs(t, err, ErrValue)
	assert.ErrorContains(t, err, `row 2, class "a"`)
	_, err = Rank(mat.NewDense(2, 2, nil), mat.NewDense(2, 2, nil), []string{"a"})
	assert.ErrorIs(t, err, ErrShape)
	assert.True(t, errors.Is(err, ErrShape))
}
