package data

import (
	"bytes"
	"errors"
	"io"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

func readFile(t testing.TB, name string, opt CSVOptions) *Set {
	t.Helper()
	f, err := os.Open("testdata/" + name)
	require.NoError(t, err)
	defer f.Close()
	s, err := ReadCSV(f, opt)
	require.NoError(t, err)
	return s
}

// Iris (Fisher 1936, UCI "Iris"): the summary table of the UCI
// documentation, as copied in /work/shared/datasets/README.md. Means and
// SDs are printed to two decimals and published copies of the set differ
// in two rows, hence the tolerance 0.01; min and max are exact.
func TestIrisMatchesPublishedSummary(t *testing.T) {
	s := readFile(t, "iris.csv", CSVOptions{})
	require.Equal(t, 150, s.Rows())
	assert.Equal(t, []string{"sepal_length_cm", "sepal_width_cm", "petal_length_cm", "petal_width_cm"}, s.Features)
	assert.Equal(t, []string{"setosa", "versicolor", "virginica"}, s.Classes)
	assert.Equal(t, []int{50, 50, 50}, s.Counts()) // UCI "Iris": 50 per class
	want := []struct{ mean, sd, lo, hi float64 }{
		{5.84, 0.83, 4.3, 7.9},
		{3.05, 0.43, 2.0, 4.4},
		{3.76, 1.76, 1.0, 6.9},
		{1.20, 0.76, 0.1, 2.5},
	}
	col := make([]float64, s.Rows())
	for j, w := range want {
		mat.Col(col, j, s.X)
		mean, sd := stat.MeanStdDev(col, nil)
		assert.InDelta(t, w.mean, mean, 0.01, "mean of %s", s.Features[j])
		assert.InDelta(t, w.sd, sd, 0.01, "SD of %s", s.Features[j])
		assert.Equal(t, w.lo, floatsMin(col), "min of %s", s.Features[j])
		assert.Equal(t, w.hi, floatsMax(col), "max of %s", s.Features[j])
	}
	assert.Equal(t, 2, s.Lines[0])
	assert.Equal(t, 151, s.Lines[149])
}

// WDBC (Street, Wolberg and Mangasarian 1993, UCI "Breast Cancer Wisconsin
// (Diagnostic)"): class counts and feature ranges from the UCI
// documentation, as copied in /work/shared/datasets/README.md.
func TestWDBCMatchesPublishedFacts(t *testing.T) {
	s := readFile(t, "wdbc.csv", CSVOptions{Classes: []string{"malignant", "benign"}})
	require.Equal(t, 569, s.Rows())
	assert.Len(t, s.Features, 30)
	assert.Equal(t, []int{212, 357}, s.Counts())
	col := make([]float64, s.Rows())
	for _, c := range []struct {
		name   string
		lo, hi float64
	}{{"radius_mean", 6.981, 28.11}, {"area_mean", 143.5, 2501.0}} {
		j := indexOf(s.Features, c.name)
		require.GreaterOrEqual(t, j, 0, c.name)
		mat.Col(col, j, s.X)
		assert.Equal(t, c.lo, floatsMin(col), c.name)
		assert.Equal(t, c.hi, floatsMax(col), c.name)
	}
}

func TestReadCSVGood(t *testing.T) {
	tests := []struct {
		name     string
		in       string
		opt      CSVOptions
		x        [][]float64
		classes  []string
		y        [][]float64 // nil: Y must be nil
		features []string
		lines    []int
	}{{
		name: "plain", in: "a,b,c\n1,2,x\n3,4,y\n",
		x: [][]float64{{1, 2}, {3, 4}}, classes: []string{"x", "y"}, y: [][]float64{{1, 0}, {0, 1}},
		features: []string{"a", "b"}, lines: []int{2, 3},
	}, {
		// RFC 4180 §2: CRLF line ends, a last line without a line end.
		name: "crlf", in: "a,c\r\n1,x\r\n2,y",
		x: [][]float64{{1}, {2}}, classes: []string{"x", "y"}, y: [][]float64{{1, 0}, {0, 1}},
		features: []string{"a"}, lines: []int{2, 3},
	}, {
		// RFC 4180 §2 rules 5–7: quoted fields with an embedded comma, a
		// line break and a doubled quote; the line break moves later lines.
		name: "quoted", in: "\"a\",\"c, d\"\n\"1\",\"x,\"\"q\"\"\ny\"\n2,z\n",
		x: [][]float64{{1}, {2}}, classes: []string{"x,\"q\"\ny", "z"}, y: [][]float64{{1, 0}, {0, 1}},
		features: []string{"a"}, lines: []int{2, 4},
	}, {
		name: "bom and blank lines and spaces", in: "\uFEFFa, c\n\n 1 , x \n\n2,y\n\n",
		x: [][]float64{{1}, {2}}, classes: []string{"x", "y"}, y: [][]float64{{1, 0}, {0, 1}},
		features: []string{"a"}, lines: []int{3, 5},
	}, {
		// integer labels sort numerically: 2 before 10
		name: "integer labels", in: "a,k\n1,10\n2,2\n3,2\n",
		x: [][]float64{{1}, {2}, {3}}, classes: []string{"2", "10"}, y: [][]float64{{0, 1}, {1, 0}, {1, 0}},
		features: []string{"a"}, lines: []int{2, 3, 4},
	}, {
		name: "label by name, first column", in: "k,a,b\nx,1,2\n", opt: CSVOptions{Label: "k"},
		x: [][]float64{{1, 2}}, classes: []string{"x"}, y: [][]float64{{1}},
		features: []string{"a", "b"}, lines: []int{2},
	}, {
		name: "features by name in another order", in: "a,b,c,k\n1,2,3,x\n",
		opt: CSVOptions{Features: []string{"c", "a"}, Classes: []string{"y", "x"}},
		x:   [][]float64{{3, 1}}, classes: []string{"y", "x"}, y: [][]float64{{0, 1}},
		features: []string{"c", "a"}, lines: []int{2},
	}, {
		name: "multilabel", in: "a,k\n1,x|z\n2,\n3, z \n", opt: CSVOptions{Multilabel: true},
		x: [][]float64{{1}, {2}, {3}}, classes: []string{"x", "z"}, y: [][]float64{{1, 1}, {0, 0}, {0, 1}},
		features: []string{"a"}, lines: []int{2, 3, 4},
	}, {
		name: "no label", in: "a,b\n1,2\n", opt: CSVOptions{NoLabel: true},
		x: [][]float64{{1, 2}}, features: []string{"a", "b"}, lines: []int{2},
	}, {
		name: "no label, named label absent", in: "a,b\n1,2\n", opt: CSVOptions{NoLabel: true, Label: "k"},
		x: [][]float64{{1, 2}}, features: []string{"a", "b"}, lines: []int{2},
	}, {
		name: "no label, named label present is skipped", in: "a,k,b\n1,zz,2\n", opt: CSVOptions{NoLabel: true, Label: "k"},
		x: [][]float64{{1, 2}}, features: []string{"a", "b"}, lines: []int{2},
	}, {
		name: "semicolons and exponents", in: "a;b;k\n1e3;-2.5E-1;x\n", opt: CSVOptions{Comma: ';'},
		x: [][]float64{{1000, -0.25}}, classes: []string{"x"}, y: [][]float64{{1}},
		features: []string{"a", "b"}, lines: []int{2},
	}}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := ReadCSV(strings.NewReader(tt.in), tt.opt)
			require.NoError(t, err)
			assert.Equal(t, tt.x, rowsOf(s.X))
			assert.Equal(t, tt.features, s.Features)
			assert.Equal(t, tt.lines, s.Lines)
			assert.Equal(t, tt.classes, s.Classes)
			if tt.y == nil {
				assert.Nil(t, s.Y)
			} else {
				assert.Equal(t, tt.y, rowsOf(s.Y))
			}
		})
	}
}

func TestReadCSVBad(t *testing.T) {
	tests := []struct {
		name   string
		in     string
		opt    CSVOptions
		kind   error
		line   int
		row    int
		column string
		msg    string // the whole message when not ""
	}{
		{name: "empty file", in: "", kind: ErrEmpty, line: 1},
		{name: "blank lines only", in: "\n\n\r\n", kind: ErrEmpty, line: 1},
		{name: "only a header", in: "a,b,k\n", kind: ErrEmpty, line: 1},
		{name: "numeric first row", in: "5.1,3.5,1\n4.9,3.0,2\n", kind: ErrNoHeader, line: 1},
		{name: "duplicate column", in: "a,b,a,k\n1,2,3,x\n", kind: ErrDuplicateColumn, line: 1, column: "a"},
		{name: "missing label", in: "a,b\n1,2\n", opt: CSVOptions{Label: "k"}, kind: ErrMissingColumn, line: 1, column: "k"},
		{name: "missing feature", in: "a,b,k\n1,2,x\n", opt: CSVOptions{Features: []string{"b", "q"}}, kind: ErrMissingColumn, line: 1, column: "q"},
		{name: "label as feature", in: "a,b,k\n1,2,x\n", opt: CSVOptions{Features: []string{"k"}}, kind: ErrOptions, line: 1, column: "k"},
		{name: "inputs mismatch", in: "a,b,k\n1,2,x\n", opt: CSVOptions{Inputs: 3}, kind: ErrFeatureCount, line: 1,
			msg: "line 1: 2 feature columns, expected 3 (the spec's inputs)"},
		{name: "label only", in: "k\nx\n", kind: ErrMissingColumn, line: 1},
		{name: "too many columns", in: "a,b,c,k\n", opt: CSVOptions{MaxColumns: 3}, kind: ErrTooLarge, line: 1},
		{name: "too few fields", in: "a,b,k\n1,2,x\n3,x\n", kind: ErrFieldCount, line: 3, row: 2,
			msg: "line 3 (row 2): 2 fields, expected 3 as in the header"},
		{name: "too many fields", in: "a,b,k\n1,2,3,x\n", kind: ErrFieldCount, line: 2, row: 1},
		{name: "not a number", in: "sepal,petal_width,k\n1,2,x\n\n1,2,x\n1,2,x\n1,2,x\n1,abc,x\n", kind: ErrNotNumber, line: 7, row: 5, column: "petal_width",
			msg: `line 7 (row 5), column "petal_width": "abc" is not a number; declare ` + "`type: category`" + ` for a text column`},
		{name: "empty feature", in: "a,b,k\n1,,x\n", kind: ErrEmptyField, line: 2, row: 1, column: "b"},
		{name: "blank feature", in: "a,b,k\n1,  ,x\n", kind: ErrEmptyField, line: 2, row: 1, column: "b"},
		{name: "NaN", in: "a,b,k\n1,NaN,x\n", kind: ErrNotFinite, line: 2, row: 1, column: "b"},
		{name: "Inf", in: "a,b,k\n-Inf,1,x\n", kind: ErrNotFinite, line: 2, row: 1, column: "a"},
		{name: "overflow", in: "a,b,k\n1,1e400,x\n", kind: ErrNotFinite, line: 2, row: 1, column: "b"},
		{name: "first error in the row", in: "k,a,b\n,x,1\n", opt: CSVOptions{Label: "k"}, kind: ErrEmptyField, line: 2, row: 1, column: "k"},
		{name: "first error in file order despite Features order", in: "a,b,k\nq,r,x\n", opt: CSVOptions{Features: []string{"b", "a"}}, kind: ErrNotNumber, line: 2, row: 1, column: "a"},
		{name: "unknown class", in: "a,k\n1,x\n2,w\n", opt: CSVOptions{Classes: []string{"x", "y"}}, kind: ErrUnknownClass, line: 3, row: 2, column: "k",
			msg: `line 3 (row 2), column "k": "w" is not one of the classes ("x", "y")`},
		{name: "empty label", in: "a,k\n1,x\n2, \n", kind: ErrEmptyField, line: 3, row: 2, column: "k"},
		{name: "unknown class in a set", in: "a,k\n1,x|w\n", opt: CSVOptions{Multilabel: true, Classes: []string{"x"}}, kind: ErrUnknownClass, line: 2, row: 1, column: "k"},
		{name: "empty class in a set", in: "a,k\n1,x||y\n", opt: CSVOptions{Multilabel: true}, kind: ErrUnknownClass, line: 2, row: 1, column: "k"},
		{name: "no class at all", in: "a,k\n1,\n2,\n", opt: CSVOptions{Multilabel: true}, kind: ErrNoClasses, line: 1, column: "k"},
		// RFC 4180 §2 rule 5: a quote may appear only in a quoted field.
		{name: "bare quote", in: "a,k\n1,x\n1\"2,x\n", kind: ErrQuote, line: 3, row: 2},
		{name: "unclosed quote", in: "a,k\n1,\"x\n2,y\n", kind: ErrQuote, line: 3, row: 1},
		{name: "max rows", in: "a,k\n1,x\n2,x\n3,x\n", opt: CSVOptions{MaxRows: 2}, kind: ErrTooLarge, line: 4, row: 3},
		{name: "long line", in: "a,k\n1,x\n12345678,x\n", opt: CSVOptions{MaxLineBytes: 8}, kind: ErrTooLarge, line: 3, row: 2},
		{name: "long record across lines", in: "a,k\n1,\"x\nyy\nzz\"\n", opt: CSVOptions{MaxLineBytes: 8}, kind: ErrTooLarge, line: 2, row: 1},
		{name: "earlier error before long line", in: "a,k\n1,x\nz,x\n12345678901234567890,x\n", opt: CSVOptions{MaxLineBytes: 8}, kind: ErrNotNumber, line: 3, row: 2, column: "a"},
		{name: "earlier quote error before long line", in: "a,k\n1,x\n\"1\"2,x\n12345678901234567890,x\n", opt: CSVOptions{MaxLineBytes: 10}, kind: ErrQuote, line: 3, row: 2},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := ReadCSV(strings.NewReader(tt.in), tt.opt)
			require.Error(t, err)
			assert.Nil(t, s)
			assert.ErrorIs(t, err, tt.kind)
			var e *Error
			require.ErrorAs(t, err, &e)
			assert.Equal(t, tt.line, e.Line, "line")
			assert.Equal(t, tt.row, e.Row, "row")
			assert.Equal(t, tt.column, e.Column, "column")
			if tt.msg != "" {
				assert.Equal(t, tt.msg, err.Error())
			}
		})
	}
}

func TestReadCSVBadOptions(t *testing.T) {
	for _, opt := range []CSVOptions{
		{Comma: '"'},
		{Comma: '|', Multilabel: true},
		{Features: []string{"a"}, Inputs: 2},
		{Features: []string{}},
		{Features: []string{"a", "a"}},
		{Classes: []string{"x", "x"}},
		{Classes: []string{" x"}},
		{Classes: []string{"x|y"}, Multilabel: true},
	} {
		_, err := ReadCSV(strings.NewReader("a,k\n1,x\n"), opt)
		assert.ErrorIs(t, err, ErrOptions, "%+v", opt)
	}
}

// failReader fails after its text.
type failReader struct{ r io.Reader }

var errDisk = errors.New("disk on fire")

func (f *failReader) Read(p []byte) (int, error) {
	n, err := f.r.Read(p)
	if err == io.EOF {
		return n, errDisk
	}
	return n, err
}

func TestReadCSVReadError(t *testing.T) {
	_, err := ReadCSV(&failReader{strings.NewReader("a,k\n1,x\n2,y")}, CSVOptions{})
	assert.ErrorIs(t, err, ErrRead)
	assert.ErrorIs(t, err, errDisk)
	var e *Error
	require.ErrorAs(t, err, &e)
	assert.Equal(t, 3, e.Line)
}

// endless yields a header, then one line of the byte c that never ends
// before total bytes, without holding it in memory.
type endless struct {
	head  string
	c     byte
	total int
}

func (r *endless) Read(p []byte) (int, error) {
	if r.total <= 0 {
		return 0, io.EOF
	}
	n := 0
	for n < len(p) && r.total > 0 {
		if r.head != "" {
			k := copy(p[n:], r.head)
			r.head = r.head[k:]
			n += k
			continue
		}
		p[n] = r.c
		n++
		r.total--
	}
	return n, nil
}

func TestReadCSVHugeInputs(t *testing.T) {
	t.Run("100 MB line", func(t *testing.T) {
		r := &endless{head: "a,k\n", c: '1', total: 100 << 20}
		_, err := ReadCSV(r, CSVOptions{})
		assert.ErrorIs(t, err, ErrTooLarge)
		var e *Error
		require.ErrorAs(t, err, &e)
		assert.Equal(t, 2, e.Line)
		assert.Equal(t, 1, e.Row)
		assert.Greater(t, r.total, 98<<20, "read far past the limit")
	})
	t.Run("100 MB quoted record", func(t *testing.T) {
		r := &endless{head: "a,k\n1,\"", c: '\n', total: 100 << 20}
		_, err := ReadCSV(r, CSVOptions{})
		assert.ErrorIs(t, err, ErrTooLarge)
		var e *Error
		require.ErrorAs(t, err, &e)
		assert.Equal(t, 2, e.Line)
		assert.Greater(t, r.total, 98<<20, "read far past the limit")
	})
	t.Run("1e5 columns", func(t *testing.T) {
		var b bytes.Buffer
		for i := range 100_000 {
			if i > 0 {
				b.WriteByte(',')
			}
			b.WriteString("c")
			b.WriteString(strings.Repeat("x", i%3))
		}
		b.WriteString("\n")
		_, err := ReadCSV(&b, CSVOptions{})
		assert.ErrorIs(t, err, ErrTooLarge)
		var e *Error
		require.ErrorAs(t, err, &e)
		assert.Equal(t, 1, e.Line)
		assert.Contains(t, err.Error(), "100000 columns")
	})
}

func TestErrorMessage(t *testing.T) {
	tests := []struct {
		e    Error
		want string
	}{
		{Error{Line: 7, Row: 6, Column: "petal_width", Field: 4, Err: describe(ErrNotNumber, `"abc" is not a number`)},
			`line 7 (row 6), column "petal_width": "abc" is not a number`},
		{Error{Line: 3, Row: 2, Field: 2, Err: ErrQuote}, "line 3 (row 2), field 2: data: misplaced quote"},
		{Error{Line: 1, Err: ErrEmpty}, "line 1: data: no data"},
		{Error{Line: 1}, "line 1: unknown error"},
	}
	for _, tt := range tests {
		assert.Equal(t, tt.want, tt.e.Error())
	}
}

func BenchmarkReadCSV(b *testing.B) {
	for _, name := range []string{"iris.csv", "wdbc.csv"} {
		in, err := os.ReadFile("testdata/" + name)
		require.NoError(b, err)
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(in)))
			for b.Loop() {
				if _, err := ReadCSV(bytes.NewReader(in), CSVOptions{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func rowsOf(m *mat.Dense) [][]float64 {
	if m == nil {
		return nil
	}
	r, _ := m.Dims()
	out := make([][]float64, r)
	for i := range r {
		out[i] = append([]float64(nil), m.RawRowView(i)...)
	}
	return out
}

func floatsMin(v []float64) float64 {
	m := math.Inf(1)
	for _, a := range v {
		m = min(m, a)
	}
	return m
}

func floatsMax(v []float64) float64 {
	m := math.Inf(-1)
	for _, a := range v {
		m = max(m, a)
	}
	return m
}

func indexOf(names []string, name string) int {
	for i, n := range names {
		if n == name {
			return i
		}
	}
	return -1
}

// RowsHint changes where the rows are kept, never what is read: the same
// Set for no hint, a hint below, at and above the rows (iris: 150 rows),
// and with a hint at or above the rows no room beyond the hint is taken.
func TestRowsHint(t *testing.T) {
	want := readFile(t, "iris.csv", CSVOptions{Label: "species"})
	for _, tc := range []struct {
		name string
		hint int
	}{{"below", 10}, {"exact", 150}, {"above", 160}, {"negative", -5}} {
		t.Run(tc.name, func(t *testing.T) {
			got := readFile(t, "iris.csv", CSVOptions{Label: "species", RowsHint: tc.hint})
			assert.Equal(t, want, got)
			if tc.hint >= 150 {
				raw := got.X.RawMatrix()
				assert.Equal(t, tc.hint*4, cap(raw.Data), "room for the hinted rows, no more")
			}
		})
	}
	got := readFile(t, "iris.csv", CSVOptions{Label: "species", RowsHint: 1 << 40, MaxRows: 200})
	assert.Equal(t, 200*4, cap(got.X.RawMatrix().Data), "MaxRows bounds the room a hint takes")
}
