package nn

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/spec"
)

func TestLayout(t *testing.T) {
	s := testSpec(4, []int{5, 3}, spec.ReLU, outSoftmax)
	n := mustCompile(t, s)
	// Widths 4-5-3-3: (4+1)·5 + (5+1)·3 + (3+1)·3 = 25 + 18 + 12 = 55,
	// also the count from spec.Network.ParamCount.
	require.Equal(t, 55, n.NumParams(), "NumParams")
	require.Equal(t, s.ParamCount(), n.NumParams(), "NumParams against ParamCount")
	require.Equal(t, 3, n.NumLayers(), "layers")
	require.Equal(t, 4, n.Inputs(), "inputs")
	require.Equal(t, 3, n.Outputs(), "outputs")
	blocks := [][2]int{{0, 20}, {25, 40}, {43, 52}}
	for l, want := range blocks {
		w, b := n.Block(l)
		assert.Equal(t, want, [2]int{w, b}, "Block(%d)", l)
	}

	p := make([]float64, n.NumParams())
	w := n.Weights(p, 1)
	r, c := w.Dims()
	require.Equal(t, [2]int{3, 5}, [2]int{r, c}, "Weights(1)'s rows × columns")
	w.Set(2, 4, 7) // row 2, column 4 → offset 25 + 2·5 + 4 = 39
	n.Bias(p, 1).SetVec(1, -3)
	assert.Equal(t, 7.0, p[39], "views do not write through: p[39]")
	assert.Equal(t, -3.0, p[41], "views do not write through: p[41]")
	p[25] = 5
	assert.Equal(t, 5.0, n.Weights(p, 1).At(0, 0), "view does not read params")

	q := awayFromZero(rand.New(rand.NewPCG(1, 2)), n.NumParams())
	ws, bs := n.Unpack(q)
	ws[0].Set(0, 0, 123) // a copy: q unchanged
	assert.NotEqual(t, 123.0, q[0], "Unpack returned a view, want a copy")
	ws[0].Set(0, 0, q[0])
	back := make([]float64, len(q))
	n.Pack(back, ws, bs)
	for i := range q {
		require.Equal(t, q[i], back[i], "Pack(Unpack(q))[%d]", i)
	}
}

func TestInit(t *testing.T) {
	tests := []struct {
		scheme spec.Scheme
		scale  float64
		bound  func(in, out float64) float64
	}{
		// Glorot & Bengio 2010, eq. 16: U[−√6/√(n_j+n_{j+1}), √6/√(n_j+n_{j+1})].
		{spec.GlorotUniform, 0, func(in, out float64) float64 { return math.Sqrt(6 / (in + out)) }},
		// He et al. 2015 give variance 2/n_in; a uniform with that variance has half-width √(6/n_in).
		{spec.HeUniform, 0, func(in, out float64) float64 { return math.Sqrt(6 / in) }},
		{spec.Uniform, 0.05, func(in, out float64) float64 { return 0.05 }},
	}
	for _, tt := range tests {
		t.Run(tt.scheme.String(), func(t *testing.T) {
			s := testSpec(30, []int{40}, spec.Tanh, outSoftmax)
			s.Init = spec.Init{Scheme: tt.scheme, Scale: tt.scale, Seed: 11}
			n := mustCompile(t, s)
			a := n.NewParams()
			b := make([]float64, len(a))
			n.Init(b, 11)
			for i := range a {
				require.Equal(t, a[i], b[i], "Init(11) differs from NewParams with seed 11 at %d", i)
			}
			n.Init(b, 12)
			assert.False(t, b[0] == a[0] && b[1] == a[1], "seeds 11 and 12 gave the same params")
			for l := 0; l < n.NumLayers(); l++ {
				in, out := float64(n.sizes[l]), float64(n.sizes[l+1])
				r := tt.bound(in, out)
				wo, bo := n.Block(l)
				top := 0.0
				for _, v := range a[wo:bo] {
					require.LessOrEqual(t, math.Abs(v), r, "layer %d: |w| above the bound", l)
					top = math.Max(top, math.Abs(v))
				}
				// With ≥ 90 draws from U(−r, r), P(max |w| < 0.9r) = 0.9^90 < 1e-4.
				assert.GreaterOrEqual(t, top, 0.9*r, "layer %d: largest |w| below 0.9 of the bound %g", l, r)
				for _, v := range a[bo : bo+n.sizes[l+1]] {
					require.Zero(t, v, "layer %d: bias", l)
				}
			}
		})
	}
}

func TestCompileErrors(t *testing.T) {
	good := func() *spec.Network { return testSpec(3, []int{4}, spec.ReLU, outSoftmax) }
	tests := []struct {
		name   string
		modify func(s *spec.Network)
	}{
		{"no inputs", func(s *spec.Network) { s.Inputs = 0 }},
		{"zero units", func(s *spec.Network) { s.Hidden[0].Units = 0 }},
		{"softmax hidden", func(s *spec.Network) { s.Hidden[0].Activation = spec.Softmax }},
		{"missing hidden activation", func(s *spec.Network) { s.Hidden[0].Activation = 0 }},
		{"tanh output", func(s *spec.Network) { s.Output.Activation = spec.Tanh }},
		{"softmax one class", func(s *spec.Network) { s.Output.Classes = []string{"a"} }},
		{"negative l2", func(s *spec.Network) { s.Penalty.L2 = -1 }},
		{"NaN l1", func(s *spec.Network) { s.Penalty.L1 = math.NaN() }},
		{"unknown scheme", func(s *spec.Network) { s.Init.Scheme = 0 }},
		{"uniform without scale", func(s *spec.Network) { s.Init = spec.Init{Scheme: spec.Uniform} }},
		{"too many params", func(s *spec.Network) { s.Hidden[0].Units = 1 << 40 }},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s := good()
			tt.modify(s)
			_, err := Compile(s)
			assert.ErrorIs(t, err, ErrSpec, "Compile")
		})
	}
	s0 := good()
	s0.Penalty.L2 = -1
	var se *spec.Error
	_, err := Compile(s0)
	if assert.ErrorAs(t, err, &se, "Compile: want a *spec.Error for penalty.l2") {
		assert.Equal(t, "penalty.l2", se.Field, "Compile: the *spec.Error's field")
	}
	_, err = Compile(nil)
	assert.ErrorIs(t, err, ErrSpec, "Compile(nil)")
	s := good()
	n := mustCompile(t, s)
	s.Hidden[0].Units = 99 // the net keeps its own copy
	assert.Equal(t, 4, n.Spec().Hidden[0].Units, "net changed with the caller's spec")
	assert.Equal(t, (3+1)*4+(4+1)*3, n.NumParams(), "net changed with the caller's spec")
}

func TestObjectiveErrors(t *testing.T) {
	n := mustCompile(t, testSpec(3, nil, spec.ReLU, outBinary))
	x := mat.NewDense(4, 3, nil)
	y := mat.NewDense(4, 2, []float64{1, 0, 0, 1, 1, 0, 0, 1})
	bad := func(r, c int, v float64) *mat.Dense {
		d := mat.NewDense(4, 3, nil)
		d.Set(r, c, v)
		return d
	}
	badY := mat.DenseCopyOf(y)
	badY.Set(2, 1, 1.5)
	tests := []struct {
		name string
		x, y *mat.Dense
		opt  ObjectiveOptions
		want error
	}{
		{"x columns", mat.NewDense(4, 2, nil), y, ObjectiveOptions{}, ErrShape},
		{"y rows", x, mat.NewDense(3, 2, nil), ObjectiveOptions{}, ErrShape},
		{"y columns", x, mat.NewDense(4, 1, nil), ObjectiveOptions{}, ErrShape},
		{"nil x", nil, y, ObjectiveOptions{}, ErrShape},
		{"no rows", &mat.Dense{}, &mat.Dense{}, ObjectiveOptions{}, ErrNoRows},
		{"NaN", bad(1, 2, math.NaN()), y, ObjectiveOptions{}, ErrNotFinite},
		{"Inf", bad(3, 0, math.Inf(-1)), y, ObjectiveOptions{}, ErrNotFinite},
		{"target", x, badY, ObjectiveOptions{}, ErrTarget},
		{"batch", x, y, ObjectiveOptions{Batch: -1}, ErrOption},
		{"workers", x, y, ObjectiveOptions{Workers: -2}, ErrOption},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := NewObjective(n, tt.x, tt.y, tt.opt)
			assert.ErrorIs(t, err, tt.want)
		})
	}
	_, err := NewObjective(n, bad(1, 2, math.NaN()), y, ObjectiveOptions{})
	var ve *ValueError
	if assert.ErrorAs(t, err, &ve, "want a ValueError at x[1, 2]") {
		assert.Equal(t, "x", ve.Matrix, "ValueError's matrix")
		assert.Equal(t, 1, ve.Row, "ValueError's row")
		assert.Equal(t, 2, ve.Col, "ValueError's column")
	}
}

// TestFLOPs checks the count documented on FLOPs for a 4-8-3 net:
// predict = (2·4·8 + 2·8) + (2·8·3 + 2·3) = 80 + 54 = 134;
// evaluate = 134 + (2·4·8 + 8) + (2·8·3 + 3) + (2·8·3 + 2·8) = 134 + 72 + 51 + 64 = 321.
func TestFLOPs(t *testing.T) {
	n := mustCompile(t, testSpec(4, []int{8}, spec.Sigmoid, outSoftmax))
	p, e := n.FLOPs()
	assert.Equal(t, 134.0, p, "FLOPs: predict")
	assert.Equal(t, 321.0, e, "FLOPs: evaluate")
}
