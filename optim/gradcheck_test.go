package optim

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/optimize/functions"
)

func TestCheckGradient(t *testing.T) {
	wood := functions.Wood{}
	good := mghObjective{wood.Func, wood.Grad} // analytic gradient from gonum optimize/functions
	planted := mghObjective{wood.Func, func(g, x []float64) {
		wood.Grad(g, x)
		g[2] *= 1.01 // a 1% error in one component
	}}
	x := []float64{-3, -1, -3, -1}
	cases := []struct {
		name     string
		f        Objective
		settings *fd.Settings
		maxErr   float64
		minErr   float64
		index    int
	}{
		// Central differences: truncation O(h²) plus rounding O(ε/h),
		// about 1e-10 relative at fd's default step (common practice);
		// 1e-7 leaves margin for the large values of Wood at x0.
		{"correct", good, nil, 1e-7, 0, -1},
		{"correct forward", good, &fd.Settings{Formula: fd.Forward}, 1e-4, 0, -1},
		// The planted error is 1% of |g_2| = 1.2e4 at x0, far above 1e-7.
		{"planted", planted, nil, math.Inf(1), 1e-3, 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			gc, err := CheckGradient(c.f, x, c.settings)
			require.NoError(t, err)
			assert.LessOrEqual(t, gc.MaxRelErr, c.maxErr, "largest relative error")
			assert.GreaterOrEqual(t, gc.MaxRelErr, c.minErr, "largest relative error")
			if c.index >= 0 {
				assert.Equal(t, c.index, gc.Index, "coordinate of the largest error")
			}
			t.Logf("max relative error %.3g at %d", gc.MaxRelErr, gc.Index)
		})
	}
	t.Run("bad input", func(t *testing.T) {
		for _, c := range []struct {
			name string
			f    Objective
			x    []float64
			want error
		}{
			{"nil objective", nil, x, ErrNilObjective},
			{"empty x", good, nil, ErrEmptyStart},
			{"Inf in x", good, []float64{math.Inf(1), 0, 0, 0}, ErrNotFiniteStart},
		} {
			_, err := CheckGradient(c.f, c.x, nil)
			assert.ErrorIs(t, err, c.want, c.name)
		}
	})
}
