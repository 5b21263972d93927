package spec

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestRoundTrip(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("testdata", "good", "*.yaml"))
	require.NoError(t, err)
	require.GreaterOrEqual(t, len(files), 5, "want the good fixtures, got %v", files)
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			n, err := parseFile(t, f)
			require.NoError(t, err)
			var buf bytes.Buffer
			require.NoError(t, n.WriteYAML(&buf))
			m, err := Parse(bytes.NewReader(buf.Bytes()))
			require.NoError(t, err, "Parse of written spec:\n%s", buf.Bytes())
			assert.Equal(t, n, m, "round trip changed the spec:\n%s", buf.Bytes())
			// Writing is deterministic: the same value gives the same bytes.
			var again bytes.Buffer
			assert.NoError(t, m.WriteYAML(&again), "second write")
			assert.Equal(t, buf.String(), again.String(), "second write differs")
		})
	}
}

// TestRoundTripGo writes Networks built in Go whose strings need quoting.
func TestRoundTripGo(t *testing.T) {
	tests := []struct {
		name string
		n    *Network
	}{
		{"strings that read as other types", &Network{Version: 1, Name: "null", Inputs: 3, Features: []string{"1", "true", "a: b"}, Types: make([]Input, 3),
			MissingTokens: DefaultMissingTokens,
			Output:        Output{Classes: []string{"~", "- x", "#tag", "ü ñ"}, Activation: Softmax},
			Init:          Init{Scheme: GlorotUniform, Seed: 1}}},
		{"two-line name and extreme numbers", &Network{Version: 1, Name: "line one\nline two", Inputs: 1, MissingTokens: []string{"-", "null", "~", "1e3"},
			Output:  Output{Classes: []string{"0", "2"}, Activation: Sigmoid}, // not 0…K-1: written as classes
			Penalty: Penalty{L2: 1e-300, L1: 123456789.123456789},
			Init:    Init{Scheme: HeUniform, Scale: 0.30000000000000004, Seed: 42},
			Train: Train{Optimizer: GD, Iterations: 1 << 40, Batch: 1, Rate: 1e21, Tolerance: 5e-324,
				ClassWeights: ClassWeights{By: map[string]float64{"2": 1e-300, "0": 7}}}}},
		{"typed inputs and quoted levels", &Network{Version: 1, Inputs: 4, Features: []string{"method", "country", "fill", "x"},
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
			Train:         Train{ClassWeights: ClassWeights{By: map[string]float64{"a.b": 2, "[c]": 3, "d e": 0.25}}}}},
		{"balanced class weights", &Network{Version: 1, Inputs: 1, Features: []string{"x"}, Types: []Input{{Missing: MissingMode}},
			MissingTokens: DefaultMissingTokens,
			Output:        Output{Classes: []string{"no", "yes"}, Activation: Sigmoid},
			Init:          Init{Scheme: GlorotUniform, Seed: 1},
			Train:         Train{ClassWeights: ClassWeights{Balanced: true}}}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var buf bytes.Buffer
			require.NoError(t, tt.n.WriteYAML(&buf))
			m, err := Parse(&buf)
			require.NoError(t, err, "%s", buf.Bytes())
			assert.Equal(t, tt.n, m)
		})
	}
}

func TestWriteCanonical(t *testing.T) {
	n, err := parseFile(t, filepath.Join("testdata", "good", "full.yaml"))
	require.NoError(t, err)
	var buf bytes.Buffer
	require.NoError(t, n.WriteYAML(&buf))
	want, err := os.ReadFile(filepath.Join("testdata", "canonical.yaml"))
	require.NoError(t, err)
	assert.Equal(t, string(want), buf.String())
}

func TestWriteInvalid(t *testing.T) {
	n := &Network{Version: 1, Inputs: 2, Output: Output{Classes: []string{"a", "b"}}}
	var buf bytes.Buffer
	err := n.WriteYAML(&buf)
	assert.ErrorIs(t, err, ErrMissingField)
	assert.Empty(t, buf.String(), "written for an invalid network")
}

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestWriteError(t *testing.T) {
	n := &Network{Version: 1, Inputs: 2, Output: Output{Classes: []string{"a", "b"}, Activation: Softmax}, Init: Init{Scheme: GlorotUniform}}
	err := n.WriteYAML(failWriter{})
	assert.ErrorContains(t, err, "disk full", "want the writer's error")
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
