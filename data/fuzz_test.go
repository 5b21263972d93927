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
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("error %v (%T) is not a *Error", err, err)
			}
			if e.Line < 1 {
				t.Fatalf("error %q has line %d", err, e.Line)
			}
			if e.Err == nil {
				t.Fatalf("error %q wraps nothing", err)
			}
			if s != nil {
				t.Fatal("a set returned with an error")
			}
			return
		}
		r, c := s.X.Dims()
		if r != len(s.Lines) || r < 1 || c != len(s.Features) {
			t.Fatalf("dims %d×%d, %d lines, %d features", r, c, len(s.Lines), len(s.Features))
		}
		for _, v := range s.X.RawMatrix().Data {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("non-finite value %v accepted", v)
			}
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
		for mode := range 128 {
			_, err := ReadCSV(bytes.NewReader([]byte(in)), fuzzOptions(byte(mode)))
			var e *Error
			if err != nil && (!errors.As(err, &e) || e.Line < 1) {
				t.Errorf("%q mode %d: %v", in, mode, err)
			}
		}
	}
}
