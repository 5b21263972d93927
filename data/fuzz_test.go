package data

import (
	"bytes"
	"errors"
	"math"
	"testing"
)

// fuzzOptions turns the mode byte into options, so the fuzzer explores the
// option paths as well as the bytes.
func fuzzOptions(mode byte) CSVOptions {
	var o CSVOptions
	o.Multilabel = mode&1 != 0
	o.NoLabel = mode&2 != 0
	if mode&4 != 0 {
		o.Classes = []string{"a", "b", "1"}
	}
	if mode&8 != 0 {
		o.MaxLineBytes, o.MaxColumns, o.MaxRows = 64, 8, 5
	}
	if mode&16 != 0 {
		o.Label = "k"
	}
	if mode&32 != 0 {
		o.Features = []string{"y", "x"}
	}
	if mode&64 != 0 {
		o.Comma = ';'
	}
	if mode&128 != 0 {
		// Typed columns, kept columns and custom missing tokens; with
		// bit 32, Columns replaces Features.
		o.Keep = []string{"x", "k"}
		o.MissingTokens = []string{"?", "-1", ""}
		if o.Features != nil {
			o.Features = nil
			o.Columns = []Column{{Name: "y", Text: true, Missing: true}, {Name: "x", Missing: true}, {Name: "z", Text: true}}
		}
	}
	return o
}

// FuzzCSV checks that ReadCSV never panics, that every rejection is a
// *Error with a line, and that every accepted set is consistent.
// Seed corpus: testdata/fuzz/FuzzCSV.
func FuzzCSV(f *testing.F) {
	f.Fuzz(func(t *testing.T, in []byte, mode byte) {
		opt := fuzzOptions(mode)
		s, err := ReadCSV(bytes.NewReader(in), opt)
		if err != nil {
			checkError(t, err)
			if s != nil {
				t.Fatal("a set returned with an error")
			}
			return
		}
		r, c := s.X.Dims()
		if r != len(s.Lines) || r < 1 || c != len(s.Features) {
			t.Fatalf("dims %d×%d, %d lines, %d features", r, c, len(s.Lines), len(s.Features))
		}
		for i := range r {
			for j, v := range s.X.RawRowView(i) {
				col := Column{Name: s.Features[j]}
				if opt.Columns != nil {
					col = opt.Columns[j]
				}
				switch {
				case math.IsNaN(v) && col.Missing:
				case math.IsNaN(v) || math.IsInf(v, 0):
					t.Fatalf("value %v accepted in column %q", v, col.Name)
				case col.Text && (v != math.Trunc(v) || v < 0 || int(v) >= len(s.Texts[j])):
					t.Fatalf("text index %v of %d texts in column %q", v, len(s.Texts[j]), col.Name)
				}
			}
		}
		if wantKept := r; (opt.Keep == nil && s.Kept != nil) || (opt.Keep != nil && len(s.Kept) != wantKept) {
			t.Fatalf("%d kept rows for %d rows and Keep %v", len(s.Kept), r, opt.Keep)
		}
		for _, k := range s.Kept {
			if len(k) != len(opt.Keep) {
				t.Fatalf("kept row %v for Keep %v", k, opt.Keep)
			}
		}
		if (opt.NoLabel && s.Label != "") || (opt.Label != "" && !opt.NoLabel && s.Label != opt.Label) {
			t.Fatalf("label %q with NoLabel %v", s.Label, opt.NoLabel)
		}
		for i := 1; i < len(s.Lines); i++ {
			if s.Lines[i] <= s.Lines[i-1] || s.Lines[0] < 2 {
				t.Fatalf("lines not increasing: %v", s.Lines)
			}
		}
		if opt.NoLabel {
			if s.Y != nil {
				t.Fatal("Y without a label column")
			}
			return
		}
		yr, yc := s.Y.Dims()
		if yr != r || yc != len(s.Classes) {
			t.Fatalf("Y is %d×%d for %d rows, %d classes", yr, yc, r, len(s.Classes))
		}
		for i := range r {
			ones := 0
			for _, v := range s.Y.RawRowView(i) {
				switch v {
				case 1:
					ones++
				case 0:
				default:
					t.Fatalf("Y row %d holds %v", i, v)
				}
			}
			if !opt.Multilabel && ones != 1 {
				t.Fatalf("single-label row %d has %d classes", i, ones)
			}
		}
	})
}

// checkError fails unless err is a *Error, or an *ErrorList of them, each
// with a line and a wrapped problem, the list within its cap. (The fuzz
// options never contradict themselves, so there is no options error.)
func checkError(t *testing.T, err error) {
	t.Helper()
	all := []*Error{}
	var list *ErrorList
	if errors.As(err, &list) {
		if len(list.Errors) == 0 || len(list.Errors) > MaxListed+1 {
			t.Fatalf("a list of %d problems", len(list.Errors))
		}
		if len(list.More) > 0 && len(list.Errors) < MaxListed {
			t.Fatalf("%d listed but %v more", len(list.Errors), list.More)
		}
		all = list.Errors
	} else {
		var e *Error
		if !errors.As(err, &e) {
			t.Fatalf("error %v (%T) is not a *Error", err, err)
		}
		all = append(all, e)
	}
	for _, e := range all {
		if e.Line < 1 {
			t.Fatalf("error %q has line %d", e, e.Line)
		}
		if e.Err == nil {
			t.Fatalf("error %q wraps nothing", e)
		}
	}
}

// TestFuzzRegressions replays inputs worth keeping beside the corpus.
func TestFuzzRegressions(t *testing.T) {
	for _, in := range []string{
		"\"",
		"\"\n\"",
		"a\n\"1",
		"\uFEFF",
		"\uFEFF\"",
		"a,k\n1,\"\"\"",
	} {
		for mode := range 256 {
			_, err := ReadCSV(bytes.NewReader([]byte(in)), fuzzOptions(byte(mode)))
			if err != nil {
				checkError(t, err)
			}
		}
	}
}
