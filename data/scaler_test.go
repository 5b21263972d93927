package data

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

// The fitted Mean and Scale agree with gonum's stat.MeanStdDev (sample SD,
// divisor n − 1) to 1e-12 relative: both compute the same corrected
// two-pass sums, so only summation order could differ.
func TestScalerAgreesWithGonum(t *testing.T) {
	for _, name := range []string{"iris.csv", "wdbc.csv"} {
		t.Run(name, func(t *testing.T) {
			s := readFile(t, name, CSVOptions{})
			sc, warn := FitScalerNamed(s.X, s.Features)
			assert.Empty(t, warn)
			r, c := s.X.Dims()
			col := make([]float64, r)
			for j := range c {
				mat.Col(col, j, s.X)
				mean, sd := stat.MeanStdDev(col, nil)
				assert.InEpsilon(t, mean, sc.Mean[j], 1e-12, "mean %s", s.Features[j])
				assert.InEpsilon(t, sd, sc.Scale[j], 1e-12, "SD %s", s.Features[j])
			}

			// Transformed training columns have mean 0 and SD 1; 1e-12 is
			// far above the rounding of 569 sums of terms of size ≤ 10.
			var z mat.Dense
			sc.Transform(&z, s.X)
			for j := range c {
				mat.Col(col, j, &z)
				mean, sd := stat.MeanStdDev(col, nil)
				assert.InDelta(t, 0, mean, 1e-12, "scaled mean %s", s.Features[j])
				assert.InDelta(t, 1, sd, 1e-12, "scaled SD %s", s.Features[j])
			}

			// In place, and row by row, give the same numbers.
			inPlace := mat.DenseCopyOf(s.X)
			sc.Transform(inPlace, inPlace)
			assert.True(t, mat.Equal(&z, inPlace))
			row := make([]float64, c)
			sc.TransformRow(row, s.X.RawRowView(7))
			assert.Equal(t, z.RawRowView(7), row)
			// A non-Dense matrix takes the general path.
			var zt mat.Dense
			sc.Transform(&zt, mat.DenseCopyOf(s.X.T()).T())
			assert.True(t, mat.EqualApprox(&z, &zt, 0))
		})
	}
}

func TestScalerConstantColumns(t *testing.T) {
	x := mat.NewDense(3, 3, []float64{
		1, 0.1, 5,
		2, 0.1, 5,
		6, 0.1, 5,
	})
	sc, warn := FitScaler(x)
	assert.Equal(t, []float64{1, 1}, sc.Scale[1:])
	assert.Equal(t, 3.0, sc.Mean[0])
	assert.InDelta(t, math.Sqrt(7), sc.Scale[0], 1e-15) // ((1−3)² + (2−3)² + (6−3)²)/2 = 7
	assert.InDelta(t, 0.1, sc.Mean[1], 1e-16)           // three rounded additions of 0.1
	assert.Equal(t, 5.0, sc.Mean[2])
	assert.Equal(t, []string{
		"feature index 1 is constant (0.1 over 3 rows): centred, not scaled",
		"feature index 2 is constant (5 over 3 rows): centred, not scaled",
	}, warn)
	_, warn = FitScalerNamed(x, []string{"a", "b", "c"})
	assert.Contains(t, warn[0], `feature "b" (index 1)`)

	// One row: every column is constant.
	sc, warn = FitScaler(mat.NewDense(1, 2, []float64{3, 4}))
	assert.Equal(t, []float64{3, 4}, sc.Mean)
	assert.Equal(t, []float64{1, 1}, sc.Scale)
	assert.Len(t, warn, 2)
}

func TestScalerExtremeValues(t *testing.T) {
	// Squares and sums overflow float64 here; the fit must stay finite.
	x := mat.NewDense(4, 1, []float64{1e308, -1e308, 1e308, 1.7e308})
	sc, warn := FitScaler(x)
	assert.Empty(t, warn)
	// mean = 0.4425e308; deviations ±; SD by hand ≈ 1.2435e308 (sample).
	col := []float64{1, -1, 1, 1.7}
	m, sd := stat.MeanStdDev(col, nil)
	assert.InEpsilon(t, m*1e308, sc.Mean[0], 1e-12)
	assert.InEpsilon(t, sd*1e308, sc.Scale[0], 1e-12)
}

func TestScalerPanicsOnWrongWidth(t *testing.T) {
	sc := &Scaler{Mean: []float64{0, 0}, Scale: []float64{1, 1}}
	assert.Panics(t, func() { sc.TransformRow(make([]float64, 3), make([]float64, 3)) })
	assert.Panics(t, func() { sc.Transform(&mat.Dense{}, mat.NewDense(2, 3, nil)) })
	assert.Panics(t, func() { sc.Transform(mat.NewDense(3, 2, nil), mat.NewDense(2, 2, nil)) })
}

func TestTransformRowAllocatesNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	x := make([]float64, 30)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	sc, _ := FitScaler(mat.NewDense(3, 10, x[:30]))
	row := make([]float64, 10)
	allocs := testing.AllocsPerRun(100, func() { sc.TransformRow(row, x[:10]) })
	assert.Zero(t, allocs)
}

func BenchmarkTransformRow(b *testing.B) {
	s := readFile(b, "wdbc.csv", CSVOptions{})
	sc, _ := FitScaler(s.X)
	row := make([]float64, 30)
	b.ReportAllocs()
	for b.Loop() {
		sc.TransformRow(row, s.X.RawRowView(3))
	}
}
