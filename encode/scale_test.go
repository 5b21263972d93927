package encode

import (
	"math"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"

	"github.com/seine-ml/seine/data"
)

// The fitted means and scales agree with gonum's stat.MeanStdDev (sample
// SD, divisor n − 1) to 1e-12 relative on the open iris and WDBC data
// (data/testdata, with their SOURCE.md): both compute the same corrected
// two-pass sums, so only summation order could differ. The standardised
// columns then have mean 0 and SD 1; 1e-12 is far above the rounding of
// 569 sums of terms of size ≤ 10.
func TestFitScaleAgreesWithGonum(t *testing.T) {
	for _, name := range []string{"iris.csv", "wdbc.csv"} {
		t.Run(name, func(t *testing.T) {
			f, err := os.Open("../data/testdata/" + name)
			require.NoError(t, err)
			defer f.Close()
			s, err := data.ReadCSV(f, data.CSVOptions{})
			require.NoError(t, err)
			mean, scale, warn := fitScale(s.X, s.Features)
			assert.Empty(t, warn)
			r, c := s.X.Dims()
			col := make([]float64, r)
			for j := range c {
				mat.Col(col, j, s.X)
				m, sd := stat.MeanStdDev(col, nil)
				assert.InEpsilon(t, m, mean[j], 1e-12, "mean %s", s.Features[j])
				assert.InEpsilon(t, sd, scale[j], 1e-12, "SD %s", s.Features[j])
				for i := range col {
					col[i] = (col[i] - mean[j]) / scale[j]
				}
				m, sd = stat.MeanStdDev(col, nil)
				assert.InDelta(t, 0, m, 1e-12, "scaled mean %s", s.Features[j])
				assert.InDelta(t, 1, sd, 1e-12, "scaled SD %s", s.Features[j])
			}
		})
	}
}

func TestFitScaleConstantColumns(t *testing.T) {
	x := mat.NewDense(3, 3, []float64{
		1, 0.1, 5,
		2, 0.1, 5,
		6, 0.1, 5,
	})
	mean, scale, warn := fitScale(x, nil)
	assert.Equal(t, []float64{1, 1}, scale[1:])
	assert.Equal(t, 3.0, mean[0])
	assert.InDelta(t, math.Sqrt(7), scale[0], 1e-15) // ((1−3)² + (2−3)² + (6−3)²)/2 = 7
	assert.InDelta(t, 0.1, mean[1], 1e-16)           // three rounded additions of 0.1
	assert.Equal(t, 5.0, mean[2])
	assert.Equal(t, []string{
		"feature index 1 is constant (0.1 over 3 rows): centred, not scaled",
		"feature index 2 is constant (5 over 3 rows): centred, not scaled",
	}, warn)
	_, _, warn = fitScale(x, []string{"a", "b", "c"})
	assert.Contains(t, warn[0], `feature "b" (index 1)`)

	// One row: every column is constant.
	mean, scale, warn = fitScale(mat.NewDense(1, 2, []float64{3, 4}), nil)
	assert.Equal(t, []float64{3, 4}, mean)
	assert.Equal(t, []float64{1, 1}, scale)
	assert.Len(t, warn, 2)
	assert.Panics(t, func() { fitScale(x, []string{"a"}) }, "one name per column")
}

func TestFitScaleExtremeValues(t *testing.T) {
	// Squares and sums overflow float64 here; the fit must stay finite.
	x := mat.NewDense(4, 1, []float64{1e308, -1e308, 1e308, 1.7e308})
	mean, scale, warn := fitScale(x, nil)
	assert.Empty(t, warn)
	// The same column divided by 1e308 fits without overflow in gonum's
	// stat.MeanStdDev; scaled back, it is the answer.
	m, sd := stat.MeanStdDev([]float64{1, -1, 1, 1.7}, nil)
	assert.InEpsilon(t, m*1e308, mean[0], 1e-12)
	assert.InEpsilon(t, sd*1e308, scale[0], 1e-12)
}
