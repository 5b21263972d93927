package score

import (
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// A hand-worked expected calibration error (the definition of Guo, Pleiss,
// Sun & Weinberger 2017): six rows, three classes.
//
//	row probabilities (a, b, c)  truth  predicted  confidence  right  bin
//	1   .95  .03  .02             a      a          .95         yes    (.9, 1]
//	2   .9   .05  .05             b      a          .9          no     (.8, .9]  (edge: upper end included)
//	3   .85  .1   .05             a      a          .85         yes    (.8, .9]
//	4   .3   .3   .4              c      c          .4          yes    (.3, .4]  (edge)
//	5   .3   .35  .35             c      b (first)  .35         no     (.3, .4]
//	6   .6   .2   .2              b      a          .6          no     (.5, .6]  (edge)
//
// bin (.9, 1]: n 1, acc 1,   conf .95   → |1 − .95|    = .05
// bin (.8, .9]: n 2, acc 1/2, conf .875 → |.5 − .875|  = .375
// bin (.5, .6]: n 1, acc 0,   conf .6   → .6
// bin (.3, .4]: n 2, acc 1/2, conf .375 → .125
// ECE = (1·.05 + 2·.375 + 1·.6 + 2·.125)/6 = 1.65/6 = 0.275.
func TestReliabilityWorkedExample(t *testing.T) {
	p := mat.NewDense(6, 3, []float64{
		.95, .03, .02,
		.9, .05, .05,
		.85, .1, .05,
		.3, .3, .4,
		.3, .35, .35,
		.6, .2, .2,
	})
	y := mat.NewDense(6, 3, []float64{1, 0, 0, 0, 1, 0, 1, 0, 0, 0, 0, 1, 0, 0, 1, 0, 1, 0})
	r, err := ReliabilityDiagram(p, y, []string{"a", "b", "c"}, false)
	require.NoError(t, err)
	assert.Equal(t, 6, r.Items)
	require.Len(t, r.Bins, Bins)
	wantCount := []int{0, 0, 0, 2, 0, 1, 0, 0, 2, 1}
	for b, bin := range r.Bins {
		assert.Equal(t, wantCount[b], bin.Count, "bin %d", b)
		assert.Equal(t, float64(b)/10, bin.Lo)
		assert.Equal(t, float64(b+1)/10, bin.Hi)
		if bin.Count == 0 {
			assert.True(t, math.IsNaN(bin.Accuracy) && math.IsNaN(bin.Confidence), "bin %d", b)
		}
	}
	// Each figure is a handful of float64 operations on short decimals:
	// within a few ulps of the exact value, so 1e-15.
	assert.InDelta(t, 0.5, r.Bins[8].Accuracy, 0)
	assert.InDelta(t, 0.875, r.Bins[8].Confidence, 1e-15)
	assert.InDelta(t, 0.375, r.Bins[3].Confidence, 1e-15)
	assert.InDelta(t, 0.275, r.ECE, 1e-15)
}

// Multi-label: each (row, class) pair is one item, its probability
// against whether the row carries the class.
//
//	item  p     y  bin
//	1,a   0     0  [0, .1]   (0 goes to the first bin)
//	1,b   .7    1  (.6, .7]
//	2,a   .25   1  (.2, .3]
//	2,b   1     1  (.9, 1]
//
// ECE = (1·|0−0| + 1·|1−.7| + 1·|1−.25| + 1·|1−1|)/4 = 1.05/4 = 0.2625.
func TestReliabilityMultilabel(t *testing.T) {
	p := mat.NewDense(2, 2, []float64{0, .7, .25, 1})
	y := mat.NewDense(2, 2, []float64{0, 1, 1, 1})
	r, err := ReliabilityDiagram(p, y, []string{"a", "b"}, true)
	require.NoError(t, err)
	assert.Equal(t, 4, r.Items)
	for _, b := range []int{0, 2, 6, 9} {
		assert.Equal(t, 1, r.Bins[b].Count, "bin %d", b)
	}
	assert.InDelta(t, 0.2625, r.ECE, 1e-15)
}

// TestBinEdges checks the documented convention: bin b is (b/10, (b+1)/10]
// with the edges as written in decimal, and 0 in the first bin.
func TestBinEdges(t *testing.T) {
	assert.Equal(t, 0, binOf(0))
	assert.Equal(t, 0, binOf(1e-300))
	for b := 1; b <= 10; b++ {
		e := float64(b) / 10
		assert.Equal(t, b-1, binOf(e), "edge %v", e)
		if b < 10 {
			assert.Equal(t, b, binOf(math.Nextafter(e, 1)), "just above %v", e)
		}
		assert.Equal(t, b-1, binOf(math.Nextafter(e, 0)), "just below %v", e)
	}
	// Decimal literals that float64 arithmetic puts above their edge:
	// 10 × 0.3 = 3.0000000000000004, 10 × 0.7 = 7.000000000000001.
	assert.Equal(t, 2, binOf(0.3))
	assert.Equal(t, 6, binOf(0.7))
	assert.Equal(t, 9, binOf(1))
}

func TestReliabilityBadInput(t *testing.T) {
	y := mat.NewDense(1, 2, []float64{1, 0})
	_, err := ReliabilityDiagram(mat.NewDense(1, 2, []float64{math.NaN(), 0.5}), y, []string{"a", "b"}, false)
	assert.ErrorIs(t, err, ErrValue)
	assert.ErrorContains(t, err, `row 1, class "a"`)
	_, err = ReliabilityDiagram(mat.NewDense(2, 2, nil), y, []string{"a", "b"}, false)
	assert.True(t, errors.Is(err, ErrShape))
}
