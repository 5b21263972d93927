package nn

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/spec"
)

// FuzzSpecModel takes a spec from text through the whole path of a model
// file (issue 13): parse, compile, build a model over it, write and read
// it back. Each step may refuse, with an error; none may panic, and a file
// that was written must load and predict what the model predicted, bit
// for bit. The seeds are the spec package's good and bad files.
func FuzzSpecModel(f *testing.F) {
	for _, dir := range []string{"good", "bad"} {
		files, _ := filepath.Glob(filepath.Join("..", "spec", "testdata", dir, "*.yaml"))
		for _, p := range files {
			if b, err := os.ReadFile(p); err == nil {
				f.Add(b)
			}
		}
	}
	f.Fuzz(func(t *testing.T, text []byte) {
		lim := spec.Limits{MaxBytes: 1 << 16, MaxParams: 20_000, MaxClasses: 64, MaxLevels: 64}
		s, err := spec.ParseLimits(bytes.NewReader(text), lim)
		if err != nil {
			return
		}
		s = encode.Placeholder(s)
		net, err := Compile(s)
		if err != nil {
			return
		}
		in := make([]encode.Input, s.Inputs)
		for i := range in {
			name := "x"
			if s.Features != nil {
				name = s.Features[i]
			} else {
				name += string(rune('a' + i%26))
			}
			var t spec.Input
			if s.Types != nil {
				t = s.Types[i]
			}
			in[i] = encode.Input{Name: name, Type: t.Type, Levels: t.Levels, Missing: t.Missing, Unknown: t.Unknown, Fill: math.NaN(), Scale: 1}
			switch {
			case t.Type == spec.CategoryInput && t.Missing == spec.MissingMode:
				in[i].Fill = 0
			case t.Type == spec.NumberInput && t.Missing == spec.MissingConstant:
				in[i].Fill = t.Fill
			case t.Type == spec.NumberInput && t.Missing != spec.MissingRefuse:
				in[i].Fill = 0.5
			}
		}
		var enc *encode.Encoder
		if s.Features != nil {
			if enc, err = encode.New(in, s.MissingTokens); err != nil {
				return
			}
		}
		params := net.NewParams()
		m, err := NewModel(s, params, enc, nil)
		if err != nil {
			return
		}
		var buf bytes.Buffer
		if _, err := m.WriteTo(&buf); err != nil {
			// WriteTo refuses what the loader would refuse, and then
			// writes nothing.
			if buf.Len() != 0 {
				t.Fatalf("WriteTo failed (%v) but wrote %d bytes", err, buf.Len())
			}
			return
		}
		got, err := ReadModel(bytes.NewReader(buf.Bytes()))
		if err != nil {
			t.Fatalf("WriteTo wrote a model file that does not load: %v", err)
		}
		x := make([]float64, m.Inputs())
		for i := range x {
			x[i] = 0.25 * float64(i%3)
			if m.Encoder().Inputs()[i].Type == spec.CategoryInput {
				x[i] = float64(i % 2)
			}
		}
		a, b := m.Probabilities(nil, x), got.Probabilities(nil, x)
		for k := range a {
			if math.Float64bits(a[k]) != math.Float64bits(b[k]) {
				t.Fatalf("class %d: %v before the round trip, %v after", k, a[k], b[k])
			}
		}
	})
}
