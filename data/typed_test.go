package data

import (
	"errors"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Congressional Voting Records (Schlimmer 1987, UCI "Congressional Voting
// Records"): the published "?" counts per column and class counts, as
// copied in /work/shared/datasets/README.md (and testdata/SOURCE.md).
// Every vote is read as a text column that allows missing cells.
func TestVotesMissingCountsMatchPublished(t *testing.T) {
	f, err := os.Open("testdata/votes.csv")
	require.NoError(t, err)
	defer f.Close()
	header, err := os.ReadFile("testdata/votes.csv")
	require.NoError(t, err)
	names := strings.Split(strings.SplitN(string(header), "\n", 2)[0], ",")
	require.Len(t, names, 17)
	var cols []Column
	for _, n := range names[:16] {
		cols = append(cols, Column{Name: n, Text: true, Missing: true})
	}
	s, err := ReadCSV(f, CSVOptions{Columns: cols, Classes: []string{"democrat", "republican"}})
	require.NoError(t, err)
	require.Equal(t, 435, s.Rows())
	assert.Equal(t, []int{267, 168}, s.Counts())
	assert.Equal(t, "party", s.Label)
	require.Len(t, s.Texts, 16)

	published := []int{12, 48, 11, 11, 15, 11, 14, 15, 22, 7, 21, 31, 25, 17, 28, 104}
	got := make([]int, 16)
	total, rowsWithAny := 0, 0
	for i := range s.Rows() {
		has := false
		for j, v := range s.X.RawRowView(i) {
			if math.IsNaN(v) {
				got[j]++
				total++
				has = true
			}
		}
		if has {
			rowsWithAny++
		}
	}
	assert.Equal(t, published, got)
	assert.Equal(t, 392, total)       // published: 392 in all
	assert.Equal(t, 203, rowsWithAny) // published: 203 rows have at least one
	for j, texts := range s.Texts {
		assert.ElementsMatch(t, []string{"y", "n"}, texts, "column %s: only y and n besides ?", s.Features[j])
	}
}

// Breast Cancer Wisconsin, Original (Wolberg and Mangasarian 1990, UCI):
// bare_nuclei has 16 "?" and no other column any; id is passed through,
// not a feature; class counts 458 / 241 (/work/shared/datasets/README.md).
func TestBreastCancerMissingAndKeptID(t *testing.T) {
	scores := []string{"clump_thickness", "cell_size_uniformity", "cell_shape_uniformity", "marginal_adhesion",
		"epithelial_cell_size", "bare_nuclei", "bland_chromatin", "normal_nucleoli", "mitoses"}
	cols := make([]Column, len(scores))
	for j, n := range scores {
		cols[j] = Column{Name: n, Missing: true}
	}
	s := readFile(t, "breast-cancer-wisconsin.csv", CSVOptions{Columns: cols, Keep: []string{"id"}, Classes: []string{"benign", "malignant"}})
	require.Equal(t, 699, s.Rows())
	assert.Equal(t, []int{458, 241}, s.Counts())
	assert.Equal(t, scores, s.Features)
	assert.Nil(t, s.Texts, "no text columns")
	missing := make([]int, len(scores))
	for i := range s.Rows() {
		for j, v := range s.X.RawRowView(i) {
			if math.IsNaN(v) {
				missing[j]++
			} else {
				assert.True(t, v >= 1 && v <= 10 && v == math.Trunc(v), "score %v in row %d", v, i+1) // integers 1–10
			}
		}
	}
	assert.Equal(t, []int{0, 0, 0, 0, 0, 16, 0, 0, 0}, missing)
	require.Len(t, s.Kept, 699)
	assert.Equal(t, []string{"1000025"}, s.Kept[0]) // first data line of the file
	ids := map[string]int{}
	for _, k := range s.Kept {
		require.Len(t, k, 1)
		ids[k[0]]++
	}
	assert.Less(t, len(ids), 699, "the id column repeats (published)")

	// Read the old way (every column a number, refusing missing), the 16
	// cells are each reported, capped at MaxListed.
	f, err := os.Open("testdata/breast-cancer-wisconsin.csv")
	require.NoError(t, err)
	defer f.Close()
	_, err = ReadCSV(f, CSVOptions{Features: scores})
	var list *ErrorList
	require.ErrorAs(t, err, &list)
	assert.Len(t, list.Errors, 16)
	assert.Nil(t, list.More)
	for _, e := range list.Errors {
		assert.Equal(t, "bare_nuclei", e.Column)
		assert.ErrorIs(t, e, ErrMissingValue)
	}
}

func TestReadCSVTyped(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name  string
		in    string
		opt   CSVOptions
		x     [][]float64
		texts [][]string
		feats []string
		kept  [][]string
		label string
	}{{
		name: "text indices in order of first appearance; NaN for missing",
		in:   "plan,x,tenure,k\nteam,9,1.5,a\nbasic,9,?,b\nteam,9,NA,a\n  ,9,2,b\npro,9,3,a\n",
		opt:  CSVOptions{Columns: []Column{{Name: "tenure", Missing: true}, {Name: "plan", Text: true, Missing: true}}},
		x:    [][]float64{{1.5, 0}, {nan, 1}, {nan, 0}, {2, nan}, {3, 2}},
		// Texts: nil for the number column, the texts for the text column.
		texts: [][]string{nil, {"team", "basic", "pro"}}, feats: []string{"tenure", "plan"}, label: "k",
	}, {
		name: "a text column without missing reads tokens only when they are tokens",
		in:   "c,k\nn/a,x\n?x,y\n",
		opt:  CSVOptions{Columns: []Column{{Name: "c", Text: true}}},
		x:    [][]float64{{0}, {1}}, texts: [][]string{{"n/a", "?x"}}, feats: []string{"c"}, label: "k",
	}, {
		name: "custom tokens: a number token is missing, default tokens are not",
		in:   "a,c,k\n-999,?,x\n5,NA,y\n",
		opt:  CSVOptions{MissingTokens: []string{"-999"}, Columns: []Column{{Name: "a", Missing: true}, {Name: "c", Text: true, Missing: true}}},
		x:    [][]float64{{nan, 0}, {5, 1}}, texts: [][]string{nil, {"?", "NA"}}, feats: []string{"a", "c"}, label: "k",
	}, {
		name: "no tokens: an empty text is a level",
		in:   "c,k\n,x\nq,y\n",
		opt:  CSVOptions{MissingTokens: []string{}, Columns: []Column{{Name: "c", Text: true}}},
		x:    [][]float64{{0}, {1}}, texts: [][]string{{"", "q"}}, feats: []string{"c"}, label: "k",
	}, {
		name: "all cells missing: an empty, non-nil text list",
		in:   "c,k\n?,x\n,y\n",
		opt:  CSVOptions{Columns: []Column{{Name: "c", Text: true, Missing: true}}},
		x:    [][]float64{{nan}, {nan}}, texts: [][]string{{}}, feats: []string{"c"}, label: "k",
	}, {
		name: "a missing token in the label is a class",
		in:   "a,k\n1,?\n2,NA\n",
		x:    [][]float64{{1}, {2}}, feats: []string{"a"}, label: "k",
	}, {
		name: "keep, in Keep order, trimmed, also a feature and the label",
		in:   "id,a,ts,k\n 7 ,1,t1,x\n8,2,t2,y\n",
		opt:  CSVOptions{Keep: []string{"ts", "id", "k", "a"}, Features: []string{"a"}},
		x:    [][]float64{{1}, {2}}, feats: []string{"a"}, label: "k",
		kept: [][]string{{"t1", "7", "x", "1"}, {"t2", "8", "y", "2"}},
	}, {
		name: "no label: Label is empty; keep works",
		in:   "id,a\nr1,1\n",
		opt:  CSVOptions{NoLabel: true, Keep: []string{"id"}, Columns: []Column{{Name: "a"}}},
		x:    [][]float64{{1}}, feats: []string{"a"}, kept: [][]string{{"r1"}},
	}, {
		name: "CRLF is still fine",
		in:   "a,k\r\n1,x\r\n2,y\r\n",
		x:    [][]float64{{1}, {2}}, feats: []string{"a"}, label: "k",
	}, {
		name: "a CR inside quotes is text",
		in:   "a,k\n1,\"x\ry\"\n",
		x:    [][]float64{{1}}, feats: []string{"a"}, label: "k",
	}}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := ReadCSV(strings.NewReader(tt.in), tt.opt)
			require.NoError(t, err)
			assertNaNEqual(t, tt.x, rowsOf(s.X))
			assert.Equal(t, tt.texts, s.Texts)
			assert.Equal(t, tt.feats, s.Features)
			assert.Equal(t, tt.kept, s.Kept)
			assert.Equal(t, tt.label, s.Label)
		})
	}
}

// assertNaNEqual compares matrices where NaN equals NaN.
func assertNaNEqual(t *testing.T, want, got [][]float64) {
	t.Helper()
	require.Len(t, got, len(want))
	for i := range want {
		require.Len(t, got[i], len(want[i]), "row %d", i)
		for j := range want[i] {
			if math.IsNaN(want[i][j]) {
				assert.True(t, math.IsNaN(got[i][j]), "[%d][%d] = %v, want NaN", i, j, got[i][j])
			} else {
				assert.Equal(t, want[i][j], got[i][j], "[%d][%d]", i, j)
			}
		}
	}
}

// pos is where a problem is expected: line, row, column and its kind.
type pos struct {
	line, row int
	column    string
	kind      error
}

func TestReadCSVEveryProblem(t *testing.T) {
	refuseNumber := "the spec's missing rule for this input is refuse: set `missing:` (e.g. mean, median, mode)"
	refuseText := "the spec's missing rule for this input is refuse: set `missing:` (e.g. level, mode)"
	tests := []struct {
		name  string
		in    string
		opt   CSVOptions
		want  []pos
		lines []string // the whole message, line by line, when not nil
		also  []error  // further sentinels the error matches
		not   []error  // sentinels it must not match
		list  bool     // an *ErrorList (else a lone *Error)
	}{{
		name:  "a text value in a number column",
		in:    "req,plan,k\n1,basic,x\n2,3,y\n",
		want:  []pos{{2, 1, "plan", ErrNotNumber}},
		lines: []string{`line 2 (row 1), column "plan": "basic" is not a number; declare ` + "`type: category`" + ` for a text column`},
		list:  true,
	}, {
		name:  "? in a number column is a missing value, not a non-number",
		in:    "a,b,k\n1,2,x\n3,?,y\n",
		want:  []pos{{3, 2, "b", ErrMissingValue}},
		lines: []string{`line 3 (row 2), column "b": missing value "?"; ` + refuseNumber},
		not:   []error{ErrNotNumber, ErrEmptyField},
		list:  true,
	}, {
		name:  "an empty cell is missing and still an empty field",
		in:    "a,b,k\n1,,x\n",
		want:  []pos{{2, 1, "b", ErrMissingValue}},
		lines: []string{`line 2 (row 1), column "b": missing value ""; ` + refuseNumber},
		also:  []error{ErrEmptyField},
		list:  true,
	}, {
		name:  "missing in a text column that refuses it",
		in:    "c,k\nNA,x\n",
		opt:   CSVOptions{Columns: []Column{{Name: "c", Text: true}}},
		want:  []pos{{2, 1, "c", ErrMissingValue}},
		lines: []string{`line 2 (row 1), column "c": missing value "NA"; ` + refuseText},
		list:  true,
	}, {
		name: "every bad cell in file order, whatever the Columns order",
		in:   "a,b,c,k\n1,2,3,x\nq,?,3,x\n\n1,2,1e999,y\n1,2,3,\n",
		opt:  CSVOptions{Columns: []Column{{Name: "c"}, {Name: "b"}, {Name: "a"}}},
		want: []pos{{3, 2, "a", ErrNotNumber}, {3, 2, "b", ErrMissingValue}, {5, 3, "c", ErrNotFinite}, {6, 4, "k", ErrEmptyField}},
		lines: []string{
			`line 3 (row 2), column "a": "q" is not a number; declare ` + "`type: category`" + ` for a text column`,
			`line 3 (row 2), column "b": missing value "?"; ` + refuseNumber,
			`line 5 (row 3), column "c": "1e999" is not a finite number`,
			`line 6 (row 4), column "k": empty label, expected a class name`,
		},
		list: true,
	}, {
		name: "a label with '|' in a single-label file",
		in:   "a,k\n1,x\n2,x|y\n",
		opt:  CSVOptions{Classes: []string{"x", "y"}},
		want: []pos{{3, 2, "k", ErrUnknownClass}},
		lines: []string{`line 3 (row 2), column "k": "x|y" is not one of the classes ("x", "y"); multi-label? set ` +
			"`multilabel: true`"},
		list: true,
	}, {
		name: "label problems beside feature problems, label first in the file",
		in:   "k,a\nw,z\nx,1\n",
		opt:  CSVOptions{Label: "k", Classes: []string{"x"}},
		want: []pos{{2, 1, "k", ErrUnknownClass}, {2, 1, "a", ErrNotNumber}},
		list: true,
	}, {
		name: "multi-label problems in several rows",
		in:   "a,k\n1,x||y\n2,x\n3,q|x\n",
		opt:  CSVOptions{Multilabel: true, Classes: []string{"x", "y"}},
		want: []pos{{2, 1, "k", ErrUnknownClass}, {4, 3, "k", ErrUnknownClass}},
		list: true,
	}, {
		name:  "no empty token: an empty number cell is an empty field",
		in:    "a,k\n,x\n?,y\n",
		opt:   CSVOptions{MissingTokens: []string{"?"}, Columns: []Column{{Name: "a", Missing: true}}},
		want:  []pos{{2, 1, "a", ErrEmptyField}},
		lines: []string{`line 2 (row 1), column "a": empty field, expected a number`},
		not:   []error{ErrMissingValue},
		list:  true,
	}, {
		name: "custom tokens replace the defaults",
		in:   "a,k\n-,x\n?,y\n",
		opt:  CSVOptions{MissingTokens: []string{"-"}},
		want: []pos{{2, 1, "a", ErrMissingValue}, {3, 2, "a", ErrNotNumber}},
		list: true,
	}, {
		name: "a structural problem after cell problems ends the list",
		in:   "a,k\nz,x\n1\nq,x\n",
		want: []pos{{2, 1, "a", ErrNotNumber}, {3, 2, "", ErrFieldCount}},
		lines: []string{
			`line 2 (row 1), column "a": "z" is not a number; declare ` + "`type: category`" + ` for a text column`,
			`line 3 (row 2): 1 fields, expected 2 as in the header`,
		},
		list: true,
	}, {
		name: "a structural problem alone is a lone *Error",
		in:   "a,k\n1\nq,x\n",
		want: []pos{{2, 1, "", ErrFieldCount}},
	}, {
		name: "a quote problem after cell problems",
		in:   "a,k\nz,x\n1\"2,x\n",
		want: []pos{{2, 1, "a", ErrNotNumber}, {3, 2, "", ErrQuote}},
		list: true,
	}, {
		name: "max rows after cell problems",
		in:   "a,k\nz,x\n2,x\n3,x\n",
		opt:  CSVOptions{MaxRows: 2},
		want: []pos{{2, 1, "a", ErrNotNumber}, {4, 3, "", ErrTooLarge}},
		list: true,
	}, {
		name:  "CR-only line ends",
		in:    "a,b,k\r1.0,2.0,x\r3.0,2.0,y\r",
		want:  []pos{{1, 0, "", ErrLineEnds}},
		lines: []string{"line 1: lines end in a carriage return (CR) alone, as old Mac files do; save the file with LF or CRLF line ends"},
		not:   []error{ErrDuplicateColumn, ErrOptions},
	}, {
		name:  "a stray CR in an LF file",
		in:    "a,k\n1,x\n2\r3,y\n",
		want:  []pos{{3, 2, "", ErrLineEnds}},
		lines: []string{"line 3 (row 2): a carriage return (CR) not followed by a line feed (LF) outside quotes; lines must end in LF or CRLF"},
	}, {
		name:  "a kept column absent from the header",
		in:    "a,k\n1,x\n",
		opt:   CSVOptions{Keep: []string{"id", "ts"}},
		want:  []pos{{1, 0, "id", ErrMissingColumn}},
		lines: []string{`line 1, column "id": kept columns "id", "ts" not in the header ("a", "k")`},
	}, {
		name: "a column absent from the header",
		in:   "a,k\n1,x\n",
		opt:  CSVOptions{Columns: []Column{{Name: "a"}, {Name: "plan", Text: true}}},
		want: []pos{{1, 0, "plan", ErrMissingColumn}},
	}, {
		name: "the label as a column",
		in:   "a,k\n1,x\n",
		opt:  CSVOptions{Columns: []Column{{Name: "k", Text: true}}},
		want: []pos{{1, 0, "k", ErrOptions}},
	}}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := ReadCSV(strings.NewReader(tt.in), tt.opt)
			require.Error(t, err)
			assert.Nil(t, s)
			var got []*Error
			var list *ErrorList
			if tt.list {
				require.ErrorAs(t, err, &list)
				got = list.Errors
			} else {
				require.False(t, errors.As(err, &list), "a lone problem, not a list")
				var e *Error
				require.ErrorAs(t, err, &e)
				got = []*Error{e}
			}
			require.Len(t, got, len(tt.want), "%v", err)
			for i, w := range tt.want {
				e := got[i]
				assert.Equal(t, w.line, e.Line, "problem %d line", i)
				assert.Equal(t, w.row, e.Row, "problem %d row", i)
				assert.Equal(t, w.column, e.Column, "problem %d column", i)
				assert.ErrorIs(t, e, w.kind, "problem %d", i)
				assert.ErrorIs(t, err, w.kind, "the whole error, problem %d", i)
			}
			var first *Error
			require.ErrorAs(t, err, &first)
			assert.Same(t, got[0], first, "errors.As finds the first problem")
			if tt.lines != nil {
				assert.Equal(t, strings.Join(tt.lines, "\n"), err.Error())
			}
			for _, k := range tt.also {
				assert.ErrorIs(t, err, k)
			}
			for _, k := range tt.not {
				assert.NotErrorIs(t, err, k)
			}
		})
	}
}

// More than MaxListed bad cells: the first 20 in file order, then a count
// per column in header order; the count past the cap costs no memory per
// problem.
func TestReadCSVProblemCap(t *testing.T) {
	var b strings.Builder
	b.WriteString("a,b,c,k\n")
	// Rows 1–15: a and c bad (30 problems); rows 16–20: b bad (5);
	// row 21: k empty.
	for i := 1; i <= 20; i++ {
		if i <= 15 {
			fmt.Fprintf(&b, "x%d,1,?,y\n", i)
		} else {
			fmt.Fprintf(&b, "1,z%d,2,y\n", i)
		}
	}
	b.WriteString("1,2,3,\n")
	_, err := ReadCSV(strings.NewReader(b.String()), CSVOptions{})
	var list *ErrorList
	require.ErrorAs(t, err, &list)
	require.Len(t, list.Errors, MaxListed)
	// The 20 listed: rows 1–10, a then c in each.
	for i, e := range list.Errors {
		assert.Equal(t, i/2+1, e.Row, "problem %d", i)
		assert.Equal(t, i/2+2, e.Line, "problem %d", i)
		assert.Equal(t, []string{"a", "c"}[i%2], e.Column, "problem %d", i)
	}
	// Not listed: rows 11–15 (a and c: 5 each), rows 16–20 (b: 5), row 21 (k: 1).
	assert.Equal(t, []ColumnCount{{"a", 5}, {"b", 5}, {"c", 5}, {"k", 1}}, list.More)
	msg := strings.Split(err.Error(), "\n")
	require.Len(t, msg, MaxListed+4)
	assert.Equal(t, `line 2 (row 1), column "a": "x1" is not a number; declare `+"`type: category`"+` for a text column`, msg[0])
	assert.Equal(t, `line 11 (row 10), column "c": missing value "?"; the spec's missing rule for this input is refuse: set `+"`missing:`"+` (e.g. mean, median, mode)`, msg[MaxListed-1])
	assert.Equal(t, []string{`and 5 more in column "a"`, `and 5 more in column "b"`, `and 5 more in column "c"`, `and 1 more in column "k"`}, msg[MaxListed:])

	t.Run("a structural stop past the cap is still listed", func(t *testing.T) {
		_, err := ReadCSV(strings.NewReader(b.String()+"1,2\n"), CSVOptions{})
		var list *ErrorList
		require.ErrorAs(t, err, &list)
		require.Len(t, list.Errors, MaxListed+1)
		last := list.Errors[MaxListed]
		assert.ErrorIs(t, last, ErrFieldCount)
		assert.Equal(t, 23, last.Line)
		assert.Equal(t, 22, last.Row)
	})

	t.Run("100,000 bad cells", func(t *testing.T) {
		var b strings.Builder
		b.WriteString("a,k\n")
		for range 100_000 {
			b.WriteString("?,x\n")
		}
		_, err := ReadCSV(strings.NewReader(b.String()), CSVOptions{})
		var list *ErrorList
		require.ErrorAs(t, err, &list)
		assert.Len(t, list.Errors, MaxListed)
		assert.Equal(t, []ColumnCount{{"a", 100_000 - MaxListed}}, list.More)
		assert.Len(t, strings.Split(err.Error(), "\n"), MaxListed+1)
	})
}

func TestReadCSVTypedBadOptions(t *testing.T) {
	for _, opt := range []CSVOptions{
		{Columns: []Column{{Name: "a"}}, Features: []string{"a"}},
		{Columns: []Column{}},
		{Columns: []Column{{Name: "a"}, {Name: "a", Text: true}}},
		{Columns: []Column{{Name: "a"}}, Inputs: 2},
		{MissingTokens: []string{" ?"}},
		{Keep: []string{"a", "a"}},
	} {
		_, err := ReadCSV(strings.NewReader("a,k\n1,x\n"), opt)
		assert.ErrorIs(t, err, ErrOptions, "%+v", opt)
		var e *Error
		assert.False(t, errors.As(err, &e), "an options error is not a position in the file")
	}
}

// Subset, Split and Folds (through Subset) carry Texts, Kept and Label.
func TestDerivedSetsKeepTextsKeptLabel(t *testing.T) {
	var b strings.Builder
	b.WriteString("id,plan,n,churned\n")
	plans := []string{"basic", "pro", "team", "?"}
	for i := range 40 {
		fmt.Fprintf(&b, "r%d,%s,%d,%s\n", i, plans[i%4], i, []string{"no", "yes"}[i%2])
	}
	s, err := ReadCSV(strings.NewReader(b.String()), CSVOptions{
		Columns: []Column{{Name: "plan", Text: true, Missing: true}, {Name: "n"}},
		Keep:    []string{"id"},
	})
	require.NoError(t, err)
	require.Equal(t, [][]string{{"basic", "pro", "team"}, nil}, s.Texts)

	check := func(t *testing.T, d *Set) {
		t.Helper()
		assert.Equal(t, s.Texts, d.Texts)
		assert.Equal(t, "churned", d.Label)
		require.Len(t, d.Kept, d.Rows())
		for i := range d.Rows() {
			n := int(d.X.At(i, 1)) // column n holds the row index of s
			assert.Equal(t, []string{fmt.Sprint("r", n)}, d.Kept[i])
			p := d.X.At(i, 0)
			if n%4 == 3 {
				assert.True(t, math.IsNaN(p), "row %d", n)
			} else {
				assert.Equal(t, plans[n%4], d.Texts[0][int(p)], "row %d", n)
			}
		}
	}
	t.Run("subset", func(t *testing.T) { check(t, s.Subset([]int{5, 0, 39, 5})) })
	t.Run("split", func(t *testing.T) {
		tr, ho, err := Split(s, 0.25, 1)
		require.NoError(t, err)
		check(t, tr)
		check(t, ho)
		assert.Equal(t, 40, tr.Rows()+ho.Rows())
	})
	t.Run("folds", func(t *testing.T) {
		folds, err := Folds(s, 5, 1)
		require.NoError(t, err)
		for k, f := range folds {
			check(t, s.Subset(f))
			check(t, s.Subset(TrainRows(folds, k)))
		}
	})
	t.Run("empty subset", func(t *testing.T) {
		d := s.Subset(nil)
		assert.Equal(t, 0, d.Rows())
		assert.Equal(t, "churned", d.Label)
		assert.Equal(t, s.Texts, d.Texts)
	})
}
