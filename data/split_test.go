package data

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// classSet builds a single-label set whose row i has class labels[i] and
// feature value i.
func classSet(labels []int, classes int) *Set {
	n := len(labels)
	x := make([]float64, n)
	y := make([]float64, n*classes)
	for i, k := range labels {
		x[i] = float64(i)
		y[i*classes+k] = 1
	}
	s := &Set{X: mat.NewDense(n, 1, x), Y: mat.NewDense(n, classes, y), Features: []string{"i"}}
	for k := range classes {
		s.Classes = append(s.Classes, fmt.Sprint(k))
	}
	return s
}

// repeat returns counts[k] rows of class k, interleaved.
func repeat(counts ...int) []int {
	var out []int
	for more := true; more; {
		more = false
		for k := range counts {
			if counts[k] > 0 {
				out = append(out, k)
				counts[k]--
				more = true
			}
		}
	}
	return out
}

// checkPartition asserts that parts are ascending, disjoint and cover 0…n−1.
func checkPartition(t *testing.T, n int, parts ...[]int) {
	t.Helper()
	var all []int
	for _, p := range parts {
		assert.True(t, slices.IsSorted(p), "ascending")
		all = append(all, p...)
	}
	slices.Sort(all)
	require.Len(t, all, n)
	for i, v := range all {
		require.Equal(t, i, v, "each row exactly once")
	}
}

func countOf(labels, rows []int, classes int) []int {
	c := make([]int, classes)
	for _, i := range rows {
		c[labels[i]]++
	}
	return c
}

func TestSplitStratified(t *testing.T) {
	tests := []struct {
		name    string
		s       *Set
		holdout float64
		hold    int // total holdout rows, round(h·n)
	}{
		{"iris", readFile(t, "iris.csv", CSVOptions{}), 0.2, 30},
		{"wdbc", readFile(t, "wdbc.csv", CSVOptions{}), 0.25, 142},
		{"uneven", classSet(repeat(7, 3, 13, 1), 4), 0.3, 7},
		{"two rows", classSet(repeat(1, 1, 2), 3), 0.5, 1},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			labels := tt.s.Labels()
			counts := tt.s.Counts()
			train, hold, err := SplitIndices(tt.s, tt.holdout, 1)
			require.NoError(t, err)
			checkPartition(t, tt.s.Rows(), train, hold)
			assert.Len(t, hold, tt.hold)
			got := countOf(labels, hold, len(counts))
			for k, n := range counts {
				assert.Less(t, math.Abs(float64(got[k])-tt.holdout*float64(n)), 1.0, "class %d within one row", k)
				assert.Less(t, got[k], n, "class %d keeps a training row", k)
			}

			// Same seed, same split; other seeds differ.
			tr2, ho2, err := SplitIndices(tt.s, tt.holdout, 1)
			require.NoError(t, err)
			assert.Equal(t, train, tr2)
			assert.Equal(t, hold, ho2)
			if tt.s.Rows() > 20 {
				_, ho3, err := SplitIndices(tt.s, tt.holdout, 2)
				require.NoError(t, err)
				assert.NotEqual(t, hold, ho3)
			}

			// Split copies the same rows.
			trs, hos, err := Split(tt.s, tt.holdout, 1)
			require.NoError(t, err)
			assert.Equal(t, len(train), trs.Rows())
			for k, i := range hold {
				assert.Equal(t, tt.s.X.RawRowView(i), hos.X.RawRowView(k))
				assert.Equal(t, tt.s.Y.RawRowView(i), hos.Y.RawRowView(k))
			}
		})
	}
}

func TestSplitMultilabelAndUnlabelled(t *testing.T) {
	in := "a,k\n" + strings.Repeat("1,x|y\n2,y\n3,\n4,\n", 10)
	s, err := ReadCSV(strings.NewReader(in), CSVOptions{Multilabel: true})
	require.NoError(t, err)
	assert.Equal(t, []int{0, 1, -1, -1}, s.Labels()[:4])
	assert.Equal(t, []int{10, 20}, s.Counts())
	_, hold, err := SplitIndices(s, 0.1, 3)
	require.NoError(t, err)
	// strata: no class (20 rows) → 2, x (10) → 1, y-first (10) → 1
	assert.Equal(t, []int{1, 1}, countOf(s.Labels(), slices.DeleteFunc(slices.Clone(hold), func(i int) bool { return s.Labels()[i] < 0 }), 2))
	assert.Len(t, hold, 4)

	u, err := ReadCSV(strings.NewReader("a,b\n1,2\n3,4\n5,6\n7,8\n"), CSVOptions{NoLabel: true})
	require.NoError(t, err)
	train, hold, err := SplitIndices(u, 0.5, 1)
	require.NoError(t, err)
	checkPartition(t, 4, train, hold)
	assert.Len(t, hold, 2)
}

func TestSplitErrors(t *testing.T) {
	s := classSet(repeat(3, 3), 2)
	for _, h := range []float64{0, 1, -0.1, 1.5, math.NaN()} {
		_, _, err := Split(s, h, 1)
		assert.ErrorIs(t, err, ErrHoldout, "holdout %v", h)
	}
	// Singleton classes never leave training, so nothing is left to hold out.
	_, _, err := Split(classSet([]int{0, 1, 2}, 3), 0.4, 1)
	assert.ErrorIs(t, err, ErrTooFewRows)
}

func TestFolds(t *testing.T) {
	tests := []struct {
		name string
		s    *Set
		k    int
	}{
		{"iris 5", readFile(t, "iris.csv", CSVOptions{}), 5},
		{"wdbc 7", readFile(t, "wdbc.csv", CSVOptions{}), 7},
		{"uneven 3", classSet(repeat(7, 3, 13, 1), 4), 3},
		{"k = rows", classSet(repeat(2, 3), 2), 5},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			folds, err := Folds(tt.s, tt.k, 9)
			require.NoError(t, err)
			require.Len(t, folds, tt.k)
			checkPartition(t, tt.s.Rows(), folds...)
			labels, counts := tt.s.Labels(), tt.s.Counts()
			n := tt.s.Rows()
			for f, rows := range folds {
				assert.InDelta(t, float64(n)/float64(tt.k), float64(len(rows)), 1, "fold %d size", f)
				got := countOf(labels, rows, len(counts))
				for c, nc := range counts {
					assert.GreaterOrEqual(t, got[c], nc/tt.k, "fold %d class %d", f, c)
					assert.LessOrEqual(t, got[c], (nc+tt.k-1)/tt.k, "fold %d class %d", f, c)
				}
				tr := TrainRows(folds, f)
				checkPartition(t, n, tr, rows)
			}
			again, err := Folds(tt.s, tt.k, 9)
			require.NoError(t, err)
			assert.Equal(t, folds, again)
			if n > 20 {
				other, err := Folds(tt.s, tt.k, 10)
				require.NoError(t, err)
				assert.NotEqual(t, folds, other)
			}
		})
	}
	for _, k := range []int{-1, 0, 1, 7} {
		_, err := Folds(classSet(repeat(3, 3), 2), k, 1)
		assert.ErrorIs(t, err, ErrFolds, "k = %d", k)
	}
}

func TestSubsetLabelsCounts(t *testing.T) {
	s, err := ReadCSV(strings.NewReader("a,k\n1,x\n2,y\n3,x\n"), CSVOptions{})
	require.NoError(t, err)
	assert.Equal(t, []int{0, 1, 0}, s.Labels())
	assert.Equal(t, []int{2, 1}, s.Counts())
	sub := s.Subset([]int{2, 0, 2})
	assert.Equal(t, [][]float64{{3}, {1}, {3}}, rowsOf(sub.X))
	assert.Equal(t, []int{4, 2, 4}, sub.Lines)
	assert.Equal(t, []int{0, 0, 0}, sub.Labels())
	sub.Classes[0] = "changed"
	assert.Equal(t, "x", s.Classes[0], "names copied")
	sub.X.Set(0, 0, 99)
	assert.Equal(t, 3.0, s.X.At(2, 0), "rows copied")

	empty := s.Subset(nil)
	assert.Zero(t, empty.Rows())
	assert.Nil(t, empty.Labels())
	assert.Panics(t, func() { s.Subset([]int{3}) })

	var none Set
	assert.Zero(t, none.Rows())
	assert.Nil(t, none.Counts())
}
