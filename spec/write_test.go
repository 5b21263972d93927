package spec

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func TestRoundTrip(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("testdata", "good", "*.yaml"))
	if err != nil || len(files) < 5 {
		t.Fatalf("want the good fixtures, got %v, %v", files, err)
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			n, err := parseFile(t, f)
			if err != nil {
				t.Fatal(err)
			}
			var buf bytes.Buffer
			if err := n.WriteYAML(&buf); err != nil {
				t.Fatal(err)
			}
			m, err := Parse(bytes.NewReader(buf.Bytes()))
			if err != nil {
				t.Fatalf("Parse of written spec: %v\n%s", err, buf.Bytes())
			}
			if !reflect.DeepEqual(n, m) {
				t.Errorf("round trip changed the spec:\n got %#v\nwant %#v\n%s", m, n, buf.Bytes())
			}
			// Writing is deterministic: the same value gives the same bytes.
			var again bytes.Buffer
			if err := m.WriteYAML(&again); err != nil || !bytes.Equal(again.Bytes(), buf.Bytes()) {
				t.Errorf("second write differs (%v):\n%s", err, again.Bytes())
			}
		})
	}
}

// TestRoundTripGo writes Networks built in Go whose strings need quoting.
func TestRoundTripGo(t *testing.T) {
	tests := []*Network{
		{Version: 1, Name: "null", Inputs: 3, Features: []string{"1", "true", "a: b"},
			Output: Output{Classes: []string{"~", "- x", "#tag", "ü ñ"}, Activation: Softmax},
			Init:   Init{Scheme: GlorotUniform, Seed: 1}},
		{Version: 1, Name: "line one\nline two", Inputs: 1,
			Output:  Output{Classes: []string{"0", "2"}, Activation: Sigmoid}, // not 0…K-1: written as classes
			Penalty: Penalty{L2: 1e-300, L1: 123456789.123456789},
			Init:    Init{Scheme: HeUniform, Scale: 0.30000000000000004, Seed: 42},
			Train:   Train{Optimizer: GD, Iterations: 1 << 40, Batch: 1, Rate: 1e21, Tolerance: 5e-324}},
	}
	for i, n := range tests {
		var buf bytes.Buffer
		if err := n.WriteYAML(&buf); err != nil {
			t.Fatalf("%d: %v", i, err)
		}
		m, err := Parse(&buf)
		if err != nil {
			t.Fatalf("%d: %v\n%s", i, err, buf.Bytes())
		}
		if !reflect.DeepEqual(n, m) {
			t.Errorf("%d: got %#v\nwant %#v", i, m, n)
		}
	}
}

func TestWriteCanonical(t *testing.T) {
	n, err := parseFile(t, filepath.Join("testdata", "good", "full.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := n.WriteYAML(&buf); err != nil {
		t.Fatal(err)
	}
	want, err := os.ReadFile(filepath.Join("testdata", "canonical.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if buf.String() != string(want) {
		t.Errorf("got\n%s\nwant\n%s", buf.Bytes(), want)
	}
}

func TestWriteInvalid(t *testing.T) {
	n := &Network{Version: 1, Inputs: 2, Output: Output{Classes: []string{"a", "b"}}}
	var buf bytes.Buffer
	err := n.WriteYAML(&buf)
	if !errors.Is(err, ErrMissingField) {
		t.Errorf("got %v, want ErrMissingField", err)
	}
	if buf.Len() != 0 {
		t.Errorf("wrote %q for an invalid network", buf.Bytes())
	}
}

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestWriteError(t *testing.T) {
	n := &Network{Version: 1, Inputs: 2, Output: Output{Classes: []string{"a", "b"}, Activation: Softmax}, Init: Init{Scheme: GlorotUniform}}
	err := n.WriteYAML(failWriter{})
	if err == nil || !strings.Contains(err.Error(), "disk full") {
		t.Errorf("got %v, want the writer's error", err)
	}
}
