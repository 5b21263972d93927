package encode

import (
	"encoding/csv"
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/spec"
)

var nan = math.NaN()

// netOf returns a spec over the named inputs with their types.
func netOf(names []string, types []spec.Input) *spec.Network {
	return &spec.Network{
		Version: 1, Inputs: len(names), Features: names, Types: types,
		MissingTokens: spec.DefaultMissingTokens,
		Output:        spec.Output{Classes: []string{"a", "b"}, Activation: spec.Softmax},
		Init:          spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
}

// setOf returns a raw set of the given columns: numbers, or for a column
// with texts the index of each row's text (NaN for missing).
func setOf(cols [][]float64, texts [][]string, names []string) *data.Set {
	r := len(cols[0])
	x := mat.NewDense(r, len(cols), nil)
	lines := make([]int, r)
	for i := range r {
		lines[i] = i + 2
		for j := range cols {
			x.Set(i, j, cols[j][i])
		}
	}
	return &data.Set{X: x, Texts: texts, Features: names, Lines: lines}
}

// The fill values of a number column, worked by hand for the values
// 1, (missing), 3, 3, 10: mean 17/4 = 4.25; median of 1, 3, 3, 10 is the
// mean of the middle two, 3; mode 3 (twice); the constant as given.
func TestFitNumberRules(t *testing.T) {
	col := []float64{1, nan, 3, 3, 10}
	for _, tt := range []struct {
		rule spec.MissingRule
		fill float64
		want float64
	}{
		{spec.MissingMean, 0, 4.25},
		{spec.MissingMedian, 0, 3},
		{spec.MissingMode, 0, 3},
		{spec.MissingConstant, -7.5, -7.5},
	} {
		t.Run(tt.rule.String(), func(t *testing.T) {
			s := netOf([]string{"v"}, []spec.Input{{Missing: tt.rule, Fill: tt.fill}})
			e, _, err := Fit(s, setOf([][]float64{col}, nil, []string{"v"}), Options{})
			require.NoError(t, err)
			in := e.Inputs()[0]
			assert.Equal(t, tt.want, in.Fill)
			// The scaler is fitted on the filled column (common practice:
			// impute, then standardise); gonum's stat.MeanStdDev is the
			// reference, with the same n − 1 divisor.
			filled := []float64{1, tt.want, 3, 3, 10}
			m, sd := stat.MeanStdDev(filled, nil)
			assert.InDelta(t, m, in.Mean, 1e-15*math.Abs(m))
			assert.InDelta(t, sd, in.Scale, 1e-14*sd)
			u := e.Expand(make([]float64, 1), []float64{nan})
			assert.InDelta(t, (tt.want-m)/sd, u[0], 1e-15)
		})
	}
}

// An even count's median is the mean of its middle two values, an odd
// count's the middle value; ties of the mode go to the smallest value
// (common practice; scikit-learn's SimpleImputer does the same).
func TestMedianMode(t *testing.T) {
	assert.Equal(t, 2.5, median([]float64{4, 1, 2, 3}))
	assert.Equal(t, 3.0, median([]float64{5, 1, 3}))
	assert.Equal(t, 2.0, mode([]float64{5, 2, 5, 2, 9}))
	assert.Equal(t, 1e308, median([]float64{1e308, 1e308}), "no overflow in (a+b)/2")
	assert.InDelta(t, 4.4e308/3, mean([]float64{1e308, 1.7e308, 1.8e308 - 1e307}), 1e294, "no overflow in the sum")
}

func TestLevelsOrder(t *testing.T) {
	l := []string{"b", "a", "c", "B"}
	sortLevels(l)
	assert.Equal(t, []string{"B", "a", "b", "c"}, l, "byte order")
	l = []string{"10", "9", "100", "-1"}
	sortLevels(l)
	assert.Equal(t, []string{"-1", "9", "10", "100"}, l, "numeric when every level is an integer")
}

// Learned levels, the mode level and the units of each rule on a small
// category worked by hand: texts red, blue, red, (missing), green, red.
func TestFitCategory(t *testing.T) {
	texts := [][]string{{"red", "blue", "green"}}
	col := []float64{0, 1, 0, nan, 2, 0}
	for _, tt := range []struct {
		name    string
		in      spec.Input
		units   int
		missing []float64 // units of a missing value
	}{
		{"level", spec.Input{Type: spec.CategoryInput, Missing: spec.MissingLevel}, 4, []float64{0, 0, 0, 1}},
		{"mode", spec.Input{Type: spec.CategoryInput, Missing: spec.MissingMode}, 3, []float64{0, 0, 1}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			s := netOf([]string{"colour"}, []spec.Input{tt.in})
			e, _, err := Fit(s, setOf([][]float64{col}, texts, []string{"colour"}), Options{})
			require.NoError(t, err)
			in := e.Inputs()[0]
			assert.Equal(t, []string{"blue", "green", "red"}, in.Levels)
			require.Equal(t, tt.units, e.Width())
			assert.Equal(t, tt.missing, e.Expand(make([]float64, tt.units), []float64{nan}))
			assert.Equal(t, []float64{1, 0, 0}, e.Expand(make([]float64, tt.units), []float64{0})[:3])
			r := e.Resolve(s)
			assert.Equal(t, in.Levels, r.Types[0].Levels)
			assert.Equal(t, tt.units, r.Width())
			require.NoError(t, e.CheckSpec(r))
			assert.Error(t, e.CheckSpec(s), "the unresolved spec has no levels")
		})
	}
}

// Fill values and levels come from the training rows alone: extreme values
// in the holdout rows change nothing.
func TestFitUsesTrainingRowsOnly(t *testing.T) {
	s := netOf([]string{"v", "c"}, []spec.Input{{Missing: spec.MissingMedian}, {Type: spec.CategoryInput, Unknown: spec.UnknownIgnore}})
	texts := [][]string{nil, {"x", "y", "z"}}
	set := setOf([][]float64{{1, 2, 3, nan, 1e300, -1e300, 1e300}, {0, 1, 0, 1, 2, 2, 2}}, texts, s.Features)
	train := set.Subset([]int{0, 1, 2, 3})
	e, _, err := Fit(s, train, Options{})
	require.NoError(t, err)
	in := e.Inputs()
	assert.Equal(t, 2.0, in[0].Fill)
	assert.Equal(t, []string{"x", "y"}, in[1].Levels, "z appears in the holdout rows only")
	m, sd := stat.MeanStdDev([]float64{1, 2, 3, 2}, nil)
	assert.InDelta(t, m, in[0].Mean, 1e-15)
	assert.InDelta(t, sd, in[0].Scale, 1e-15)
	u, err := e.EncodeSet(set.Subset([]int{4}))
	require.NoError(t, err)
	assert.Equal(t, []float64{0, 0}, u.RawRowView(0)[1:], "unknown level z under ignore: all zeros")
}

func TestFitRefusals(t *testing.T) {
	one := setOf([][]float64{{0, 0, nan}}, [][]string{{"only"}}, []string{"c"})
	_, _, err := Fit(netOf([]string{"c"}, []spec.Input{{Type: spec.CategoryInput, Missing: spec.MissingLevel}}), one, Options{})
	assert.ErrorIs(t, err, ErrLevels)
	assert.ErrorContains(t, err, `"only"`)

	allMissing := setOf([][]float64{{nan, nan}}, nil, []string{"v"})
	_, _, err = Fit(netOf([]string{"v"}, []spec.Input{{Missing: spec.MissingMean}}), allMissing, Options{})
	assert.ErrorIs(t, err, ErrFit)
	assert.ErrorContains(t, err, "every training value is missing")

	typeMismatch := setOf([][]float64{{0, 1}}, nil, []string{"c"})
	_, _, err = Fit(netOf([]string{"c"}, []spec.Input{{Type: spec.CategoryInput}}), typeMismatch, Options{})
	assert.ErrorIs(t, err, ErrColumns)
}

// A three-input encoder for the value tests: a number filled by its mean,
// a category refusing unknown levels and missing values, and a category
// with a missing unit that ignores unknown levels.
func testEncoder(t *testing.T) *Encoder {
	t.Helper()
	e, err := New([]Input{
		{Name: "n", Type: spec.NumberInput, Missing: spec.MissingMean, Fill: 2, Mean: 1, Scale: 4},
		{Name: "plan", Type: spec.CategoryInput, Levels: []string{"basic", "pro", "team"}, Fill: nan},
		{Name: "region", Type: spec.CategoryInput, Levels: []string{"eu", "us"}, Missing: spec.MissingLevel, Unknown: spec.UnknownIgnore, Fill: nan},
	}, nil)
	require.NoError(t, err)
	return e
}

func TestCodeAndExpand(t *testing.T) {
	e := testEncoder(t)
	require.Equal(t, 3+3+1, e.Width())
	lay, err := e.Layout([]string{"region", "id", "plan", "n"})
	require.NoError(t, err)
	coded := make([]float64, 3)
	units := make([]float64, e.Width())
	for _, tt := range []struct {
		name string
		row  []Value
		want []float64
	}{
		{"all present", []Value{Text("us"), Text("x"), Text("pro"), Number(5)}, []float64{1, 0, 1, 0, 0, 1, 0}},
		{"number text", []Value{Text("eu"), Missing, Text(" team "), Text("-3")}, []float64{-1, 0, 0, 1, 1, 0, 0}},
		{"missing filled", []Value{Missing, Missing, Text("basic"), Missing}, []float64{0.25, 1, 0, 0, 0, 0, 1}},
		{"token is missing", []Value{Text("NA"), Missing, Text("basic"), Text("?")}, []float64{0.25, 1, 0, 0, 0, 0, 1}},
		{"unknown ignored", []Value{Text("apac"), Missing, Text("basic"), Number(1)}, []float64{0, 1, 0, 0, 0, 0, 0}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			require.NoError(t, lay.Code(coded, tt.row))
			assert.Equal(t, tt.want, e.Expand(units, coded))
		})
	}
	allocs := testing.AllocsPerRun(100, func() {
		if err := lay.Code(coded, []Value{Text("us"), Missing, Text("pro"), Number(5)}); err != nil {
			panic(err)
		}
		e.Expand(units, coded)
	})
	assert.Zero(t, allocs, "the bound-order path allocates nothing")
}

func TestCodeErrors(t *testing.T) {
	e := testEncoder(t)
	for _, tt := range []struct {
		name  string
		rec   map[string]any
		field string
		want  error
		msg   string
	}{
		{"absent field", map[string]any{"n": 1, "plan": "pro"}, "region", ErrMissingField, "no field"},
		{"unknown level under refuse", map[string]any{"n": 1, "plan": "gold", "region": "eu"}, "plan", ErrUnknownLevel, `"gold"`},
		{"missing under refuse", map[string]any{"n": 1, "plan": nil, "region": "eu"}, "plan", ErrMissingValue, "missing:"},
		{"number for a category", map[string]any{"n": 1, "plan": 3, "region": "eu"}, "plan", ErrType, "number"},
		{"text for a number", map[string]any{"n": "lots", "plan": "pro", "region": "eu"}, "n", ErrType, "type: category"},
		{"infinite number", map[string]any{"n": math.Inf(1), "plan": "pro", "region": "eu"}, "n", ErrNotFinite, "Inf"},
		{"a list", map[string]any{"n": []int{1}, "plan": "pro", "region": "eu"}, "n", ErrType, "[]int"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			_, err := e.CodeRecord(nil, tt.rec)
			require.Error(t, err)
			assert.ErrorIs(t, err, tt.want)
			var fe *FieldError
			require.True(t, errors.As(err, &fe))
			assert.Equal(t, tt.field, fe.Field)
			assert.Contains(t, err.Error(), tt.msg)
		})
	}
	got, err := e.CodeRecord(nil, map[string]any{"n": nil, "plan": "team", "region": "mars", "other": true})
	require.NoError(t, err)
	assert.True(t, math.IsNaN(got[0]))
	assert.Equal(t, []float64{2, -1}, got[1:])

	_, err = e.Layout([]string{"n", "plan"})
	assert.ErrorIs(t, err, ErrColumns)
	_, err = e.Layout([]string{"n", "plan", "region", "n"})
	assert.ErrorIs(t, err, ErrColumns)
}

func TestNewRefuses(t *testing.T) {
	ok := Input{Name: "c", Type: spec.CategoryInput, Levels: []string{"a", "b"}, Fill: nan}
	for _, tt := range []struct {
		name string
		in   []Input
		msg  string
	}{
		{"no inputs", nil, "no inputs"},
		{"duplicate name", []Input{ok, ok}, "both named"},
		{"one level", []Input{{Name: "c", Type: spec.CategoryInput, Levels: []string{"a"}}}, "2 levels"},
		{"duplicate level", []Input{{Name: "c", Type: spec.CategoryInput, Levels: []string{"a", "a"}}}, "twice"},
		{"level is a token", []Input{{Name: "c", Type: spec.CategoryInput, Levels: []string{"a", "NA"}}}, "missing token"},
		{"zero scale", []Input{{Name: "n", Scale: 0}}, "scale"},
		{"negative scale", []Input{{Name: "n", Scale: -1}}, "scale"},
		{"level rule on a number", []Input{{Name: "n", Scale: 1, Missing: spec.MissingLevel}}, "does not apply"},
		{"mean rule on a category", []Input{{Name: "c", Type: spec.CategoryInput, Levels: []string{"a", "b"}, Missing: spec.MissingMean}}, "does not apply"},
		{"mode index out of range", []Input{{Name: "c", Type: spec.CategoryInput, Levels: []string{"a", "b"}, Missing: spec.MissingMode, Fill: 2}}, "mode"},
		{"infinite fill", []Input{{Name: "n", Scale: 1, Missing: spec.MissingConstant, Fill: math.Inf(1)}}, "fill"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			_, err := New(tt.in, nil)
			require.ErrorIs(t, err, ErrEncoder)
			assert.Contains(t, err.Error(), tt.msg)
		})
	}
}

// readGolden reads a golden matrix written by testdata/golden.py.
func readGolden(t *testing.T, name string) [][]float64 {
	t.Helper()
	f, err := os.Open(filepath.Join("testdata", name))
	require.NoError(t, err)
	defer f.Close()
	r := csv.NewReader(f)
	r.FieldsPerRecord = -1
	recs, err := r.ReadAll()
	require.NoError(t, err)
	require.True(t, strings.HasPrefix(recs[0][0], "# made by golden.py with scikit-learn 1.2.1"))
	out := make([][]float64, len(recs)-1)
	for i, rec := range recs[1:] {
		out[i] = make([]float64, len(rec))
		for j, c := range rec {
			out[i][j], err = strconv.ParseFloat(c, 64)
			require.NoError(t, err)
		}
	}
	return out
}

// trainRows are the rows golden.py fits on: i mod 5 ≠ 0.
func trainRows(n int) []int {
	var rows []int
	for i := range n {
		if i%5 != 0 {
			rows = append(rows, i)
		}
	}
	return rows
}

// The encoded matrices of both open data sets with missing values equal
// those of a general-purpose reference, scikit-learn 1.2.1's SimpleImputer
// and OneHotEncoder fitted on the same training rows (testdata/golden.py
// made the golden files). One-hot units are exact; the medians of integer
// scores are integers or halves, so exact too.
func TestGoldenEncodings(t *testing.T) {
	for _, tt := range []struct {
		file, golden string
		rule         spec.MissingRule
		category     bool
		drop         []string // columns that are not inputs
	}{
		{"votes.csv", "golden-votes-level.csv", spec.MissingLevel, true, nil},
		{"votes.csv", "golden-votes-mode.csv", spec.MissingMode, true, nil},
		{"breast-cancer-wisconsin.csv", "golden-bcw-median.csv", spec.MissingMedian, false, []string{"id"}},
	} {
		t.Run(tt.golden, func(t *testing.T) {
			f, err := os.Open(filepath.Join("testdata", tt.file))
			require.NoError(t, err)
			defer f.Close()
			head, err := csv.NewReader(f).Read()
			require.NoError(t, err)
			var names []string
			var types []spec.Input
			for _, h := range head[:len(head)-1] {
				if !slices.Contains(tt.drop, h) {
					names = append(names, h)
					in := spec.Input{Missing: tt.rule}
					if tt.category {
						in.Type = spec.CategoryInput
					} else if h != "bare_nuclei" {
						in.Missing = spec.MissingRefuse // the file has no other gaps
					}
					types = append(types, in)
				}
			}
			s := netOf(names, types)
			s.Output.Classes = nil
			_, err = f.Seek(0, 0)
			require.NoError(t, err)
			set, err := data.ReadCSV(f, data.CSVOptions{Columns: ColumnsFor(s), MissingTokens: s.MissingTokens})
			require.NoError(t, err)
			e, _, err := Fit(s, set.Subset(trainRows(set.Rows())), Options{NoScale: true})
			require.NoError(t, err)
			u, err := e.EncodeSet(set)
			require.NoError(t, err)
			want := readGolden(t, tt.golden)
			r, c := u.Dims()
			require.Equal(t, len(want), r)
			require.Equal(t, len(want[0]), c)
			for i := range r {
				for j := range c {
					require.Equal(t, want[i][j], u.At(i, j), "row %d, unit %d: want scikit-learn's value", i, j)
				}
			}
		})
	}
}

// An unknown level under refuse in a file is reported with its line and
// column; more than 20 problems are listed up to 20 and counted per column.
func TestEncodeSetErrors(t *testing.T) {
	e := testEncoder(t)
	texts := [][]string{nil, {"pro", "gold"}, {"eu"}}
	set := setOf([][]float64{{1, 2}, {0, 1}, {0, 0}}, texts, []string{"n", "plan", "region"})
	_, err := e.EncodeSet(set)
	var de *data.Error
	require.True(t, errors.As(err, &de))
	assert.Equal(t, 3, de.Line)
	assert.Equal(t, "plan", de.Column)
	assert.ErrorIs(t, err, ErrUnknownLevel)

	n := 30
	cols := [][]float64{make([]float64, n), make([]float64, n), make([]float64, n)}
	for i := range n {
		cols[1][i] = 1
	}
	_, err = e.EncodeSet(setOf(cols, texts, []string{"n", "plan", "region"}))
	var list *data.ErrorList
	require.True(t, errors.As(err, &list))
	assert.Len(t, list.Errors, 20)
	assert.Equal(t, []data.ColumnCount{{Column: "plan", N: 10}}, list.More)
	assert.Contains(t, err.Error(), `and 10 more in column "plan"`)
}

// A number column whose values lie near both ends of the float64 range
// (issue 13): the scaler must not overflow (fitScale works on v/M for a
// largest magnitude M), and the units must be finite.
func TestExtremeColumn(t *testing.T) {
	col := []float64{1.7e308, -1.7e308, 1.6e308, -1.5e308, 0}
	s := netOf([]string{"v"}, []spec.Input{{}})
	set := setOf([][]float64{col}, nil, []string{"v"})
	e, _, err := Fit(s, set, Options{})
	require.NoError(t, err)
	in := e.Inputs()[0]
	require.False(t, math.IsInf(in.Scale, 0) || math.IsNaN(in.Scale) || math.IsNaN(in.Mean))
	u, err := e.EncodeSet(set)
	require.NoError(t, err)
	for i := range col {
		v := u.At(i, 0)
		assert.False(t, math.IsInf(v, 0) || math.IsNaN(v), "row %d: %v", i, v)
	}
	// Standardised values keep their order and sign around the mean.
	assert.Greater(t, u.At(0, 0), u.At(2, 0))
	assert.Less(t, u.At(1, 0), u.At(3, 0))
	// Worked in units of 1e308: the mean of 1.7, −1.7, 1.6, −1.5, 0 is
	// 0.1/5 = 0.02; the deviations 1.68, −1.72, 1.58, −1.52, −0.02 have
	// squares summing to 10.588, so the sample SD is √(10.588/4) ≈ 1.62696.
	assert.InDelta(t, 2e306, in.Mean, 1e293)
	// Rounding of the inputs and of each step costs a few ulps of 1.6e308
	// (an ulp is about 2e292).
	assert.InDelta(t, math.Sqrt(10.588/4)*1e308, in.Scale, 1e294)
}
