package spec

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
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
		{Version: 1, Name: "null", Inputs: 3, Features: []string{"1", "true", "a: b"}, Types: make([]Input, 3),
			MissingTokens: DefaultMissingTokens,
			Output:        Output{Classes: []string{"~", "- x", "#tag", "ü ñ"}, Activation: Softmax},
			Init:          Init{Scheme: GlorotUniform, Seed: 1}},
		{Version: 1, Name: "line one\nline two", Inputs: 1, MissingTokens: []string{"-", "null", "~", "1e3"},
			Output:  Output{Classes: []string{"0", "2"}, Activation: Sigmoid}, // not 0…K-1: written as classes
			Penalty: Penalty{L2: 1e-300, L1: 123456789.123456789},
			Init:    Init{Scheme: HeUniform, Scale: 0.30000000000000004, Seed: 42},
			Train: Train{Optimizer: GD, Iterations: 1 << 40, Batch: 1, Rate: 1e21, Tolerance: 5e-324,
				ClassWeights: ClassWeights{By: map[string]float64{"2": 1e-300, "0": 7}}}},
		{Version: 1, Inputs: 4, Features: []string{"method", "country", "fill", "x"},
			Types: []Input{
				// Levels that read as other YAML types unless quoted.
				{Type: CategoryInput, Levels: []string{"true", "1", "~", "null", "a: b", "- c", "ü"}, Missing: MissingLevel},
				{Type: CategoryInput, Missing: MissingMode, Unknown: UnknownIgnore},
				{Missing: MissingConstant, Fill: -1.7976931348623157e308},
				{Missing: MissingConstant, Fill: 5e-324},
			},
			MissingTokens: []string{},
			Output:        Output{Classes: []string{"a.b", "[c]", "d e", "f"}, Activation: Sigmoid, Multilabel: true},
			Init:          Init{Scheme: GlorotUniform, Seed: 1},
			Train:         Train{ClassWeights: ClassWeights{By: map[string]float64{"a.b": 2, "[c]": 3, "d e": 0.25}}}},
		{Version: 1, Inputs: 1, Features: []string{"x"}, Types: []Input{{Missing: MissingMode}},
			MissingTokens: DefaultMissingTokens,
			Output:        Output{Classes: []string{"no", "yes"}, Activation: Sigmoid},
			Init:          Init{Scheme: GlorotUniform, Seed: 1},
			Train:         Train{ClassWeights: ClassWeights{Balanced: true}}},
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

// TestRoundTripDefaults checks the two nil fields that read back as their
// defaults: nil Types (plain numbers) and nil MissingTokens.
func TestRoundTripDefaults(t *testing.T) {
	n := &Network{Version: 1, Inputs: 2, Features: []string{"a", "b"},
		Output: Output{Classes: []string{"x", "y"}, Activation: Softmax},
		Init:   Init{Scheme: GlorotUniform, Seed: 1}}
	var buf bytes.Buffer
	require.NoError(t, n.WriteYAML(&buf))
	assert.Equal(t, "version: 1\ninputs:\n  - a\n  - b\noutput:\n", buf.String()[:len("version: 1\ninputs:\n  - a\n  - b\noutput:\n")])
	m, err := Parse(&buf)
	require.NoError(t, err)
	assert.Equal(t, []Input{{}, {}}, m.Types)
	assert.Equal(t, DefaultMissingTokens, m.MissingTokens)
	assert.Equal(t, n.Width(), m.Width())
	for i := range n.Inputs {
		assert.Equal(t, n.Input(i), m.Input(i))
	}
	assert.Equal(t, n.missingTokensOrDefault(), m.missingTokensOrDefault())
}

// TestWriteTyped pins the canonical form of typed inputs, missing tokens
// and class weights.
func TestWriteTyped(t *testing.T) {
	n := &Network{Version: 1, Inputs: 4, Features: []string{"rate", "plan", "tenure", "region"},
		Types: []Input{
			{},
			{Type: CategoryInput, Levels: []string{"basic", "pro", "1"}},
			{Missing: MissingConstant, Fill: 0},
			{Type: CategoryInput, Missing: MissingLevel, Unknown: UnknownIgnore},
		},
		MissingTokens: []string{"", "-"},
		Output:        Output{Classes: []string{"stays", "leaves"}, Activation: Sigmoid},
		Init:          Init{Scheme: GlorotUniform, Seed: 1},
		Train:         Train{ClassWeights: ClassWeights{By: map[string]float64{"leaves": 20, "stays": 1}}},
	}
	var buf bytes.Buffer
	require.NoError(t, n.WriteYAML(&buf))
	const want = `version: 1
inputs:
  - rate
  - name: plan
    type: category
    levels: [basic, pro, "1"]
  - name: tenure
    missing: 0
  - name: region
    type: category
    missing: level
    unknown: ignore
missing_tokens: ["", '-']
output:
  classes: [stays, leaves]
  activation: sigmoid
penalty:
  l2: 0
  l1: 0
  bias: false
init:
  scheme: glorot-uniform
  seed: 1
train:
  class_weights:
    stays: 1
    leaves: 20
`
	assert.Equal(t, want, buf.String())
}
