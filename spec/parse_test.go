package spec

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func parseFile(t *testing.T, path string) (*Network, error) {
	t.Helper()
	data, err := os.ReadFile(path)
	require.NoError(t, err)
	return Parse(bytes.NewReader(data))
}

func TestParseGood(t *testing.T) {
	tests := []struct {
		file string
		want *Network
	}{
		{"full.yaml", &Network{
			Version: 1, Name: "request-triage", Inputs: 12,
			Hidden: []Layer{{32, Tanh}, {16, ReLU}},
			Output: Output{Classes: []string{"human", "crawler", "scraper", "stuffer"}, Activation: Softmax},
			// 1.0 and 1e-6 are YAML 1.2 floats (§10.3.2, core schema).
			Penalty: Penalty{L2: 1},
			Init:    Init{Scheme: GlorotUniform, Scale: 0.1, Seed: 7},
			Train:   Train{Optimizer: LBFGS, Iterations: 400, Rate: 0.01, Tolerance: 1e-6},
			// Parse sets the default missing tokens when the spec has none.
			MissingTokens: DefaultMissingTokens,
		}},
		{"units.yaml", &Network{
			Version: 1, Inputs: 4,
			Output:        Output{Classes: []string{"0", "1", "2"}, Activation: Softmax},
			Init:          Init{Scheme: GlorotUniform, Seed: 1},
			MissingTokens: DefaultMissingTokens,
		}},
		{"features.yaml", &Network{
			Version: 1, Name: "2024", Inputs: 4,
			Features: []string{"age", "bytes", "path depth", "true"},
			// Bare names are plain number inputs.
			Types:         make([]Input, 4),
			MissingTokens: DefaultMissingTokens,
			Hidden:        []Layer{{8, LeakyReLU}},
			Output:        Output{Classes: []string{"ok", "spam"}, Activation: Sigmoid},
			Init:          Init{Scheme: HeUniform, Seed: 1<<64 - 1},
			Train:         Train{Optimizer: Adam, Batch: 32, Rate: 1e-3},
		}},
		{"multilabel.yaml", &Network{
			// 0x10, 1_000 and 1e2 are integers in the forms the YAML
			// decoder resolves (hex, underscores, whole float).
			Version: 1, Inputs: 16,
			Hidden:        []Layer{{5, Softplus}, {1000, Identity}, {100, Sigmoid}},
			Output:        Output{Classes: []string{"urgent"}, Activation: Sigmoid, Multilabel: true},
			Penalty:       Penalty{L2: 0.5, L1: 2, Bias: true},
			Init:          Init{Scheme: Uniform, Scale: 0.05, Seed: 0},
			Train:         Train{Optimizer: Momentum, Iterations: 10},
			MissingTokens: DefaultMissingTokens,
		}},
		{"anchors.yaml", &Network{
			Version: 1, Inputs: 3,
			Hidden:        []Layer{{4, ReLU}, {4, ReLU}},
			Output:        Output{Classes: []string{"a", "b", "c"}, Activation: Softmax},
			Init:          Init{Scheme: GlorotUniform, Seed: 1},
			MissingTokens: DefaultMissingTokens,
		}},
		{"crlf.yaml", &Network{
			// yes and no are strings in YAML 1.2 (only true/false are booleans).
			Version: 1, Inputs: 2,
			Output:        Output{Classes: []string{"yes", "no"}, Activation: Sigmoid},
			Init:          Init{Scheme: GlorotUniform, Seed: 1},
			MissingTokens: DefaultMissingTokens,
		}},
		{"typed.yaml", &Network{
			Version: 1, Name: "churn", Inputs: 7,
			Features: []string{"req_per_min", "plan", "tenure", "region", "seats", "tier", "score"},
			Types: []Input{
				{},
				{Type: CategoryInput, Levels: []string{"basic", "pro", "team"}},
				{Missing: MissingMedian},
				{Type: CategoryInput, Missing: MissingLevel, Unknown: UnknownIgnore},
				{Missing: MissingConstant, Fill: -1.5},
				{Type: CategoryInput, Missing: MissingMode},
				{Missing: MissingMean},
			},
			MissingTokens: []string{"", "?", "n/a", "NULL_"},
			Hidden:        []Layer{{8, ReLU}},
			Output:        Output{Classes: []string{"stays", "leaves"}, Activation: Sigmoid},
			Init:          Init{Scheme: GlorotUniform, Seed: 1},
			Train:         Train{ClassWeights: ClassWeights{By: map[string]float64{"leaves": 20, "stays": 0.5}}},
		}},
		{"balanced.yaml", &Network{
			Version: 1, Inputs: 3,
			Features: []string{"method", "status", "size"},
			Types: []Input{
				{Type: CategoryInput, Levels: []string{"GET", "POST"}},
				// Quoted '200' is the text "200"; levels are names.
				{Type: CategoryInput, Levels: []string{"200", "404", "500"}, Unknown: UnknownIgnore},
				// missing: 0 is the constant 0, not "not set".
				{Missing: MissingConstant},
			},
			MissingTokens: []string{},
			Output:        Output{Classes: []string{"0", "1", "2"}, Activation: Softmax},
			Init:          Init{Scheme: GlorotUniform, Seed: 1},
			Train:         Train{Optimizer: Adam, ClassWeights: ClassWeights{Balanced: true}},
		}},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			got, err := parseFile(t, filepath.Join("testdata", "good", tt.file))
			require.NoError(t, err, "Parse")
			assert.Equal(t, tt.want, got, "Parse")
			assert.NoError(t, got.Validate(), "Validate of a parsed spec")
		})
	}
}

// A minimal valid spec; bad rows below change one thing in it.
const head = "version: 1\ninputs: 2\n"

type badTest struct {
	name   string
	src    string
	line   int
	col    int
	field  string
	kind   error
	substr string // part of the message
}

var badTests = []badTest{
	// Structure and types.
	{"empty", "", 0, 0, "", ErrEmpty, "empty spec"},
	{"comment only", "# nothing\n", 0, 0, "", ErrEmpty, "empty spec"},
	{"null document", "---\n~\n", 2, 1, "", ErrEmpty, "empty spec"},
	{"root list", "- 1\n", 1, 1, "", ErrType, "want a mapping, got a list"},
	{"two documents", head + "output: {units: 2}\n---\nversion: 1\n", 4, 1, "", ErrSyntax, "more than one YAML document"},
	{"unknown key top", head + "output: {units: 2}\noutputs: 3\n", 4, 1, "outputs", ErrUnknownField, `unknown key "outputs" (want one of version, name, inputs`},
	{"unknown key nested", head + "output: {units: 2}\ntrain:\n  epochs: 3\n", 5, 3, "train.epochs", ErrUnknownField, "want one of optimizer, iterations"},
	{"unknown key layer", head + "hidden:\n  - units: 2\n    activation: relu\n    dropout: 0.5\noutput: {units: 2}\n", 6, 5, "hidden[0].dropout", ErrUnknownField, `"dropout"`},
	{"duplicate key", head + "output: {units: 2}\nversion: 1\n", 4, 1, "version", ErrDuplicate, "first at line 1"},
	{"duplicate nested key", head + "output: {units: 2, units: 3}\n", 3, 20, "output.units", ErrDuplicate, "duplicate key"},
	{"missing version", "inputs: 2\noutput: {units: 2}\n", 1, 1, "version", ErrMissingField, "missing key version"},
	{"missing inputs", "version: 1\noutput: {units: 2}\n", 1, 1, "inputs", ErrMissingField, "missing key inputs"},
	{"null inputs", "version: 1\ninputs:\noutput: {units: 2}\n", 2, 8, "inputs", ErrMissingField, "key inputs has no value (a count, or a list of inputs)"},
	{"tilde inputs", "version: 1\ninputs: ~\noutput: {units: 2}\n", 2, 9, "inputs", ErrMissingField, "key inputs has no value"},
	{"missing output", head, 1, 1, "output", ErrMissingField, "missing key output"},
	{"missing classes", head + "output:\n  activation: softmax\n", 4, 3, "output.classes", ErrMissingField, "missing classes or units"},
	{"classes and units", head + "output:\n  classes: [a, b]\n  units: 2\n", 5, 10, "output.units", ErrConflict, "not both"},
	{"missing units", head + "hidden:\n  - activation: relu\noutput: {units: 2}\n", 4, 5, "hidden[0].units", ErrMissingField, "missing key units"},
	{"missing hidden activation", head + "hidden:\n  - units: 3\noutput: {units: 2}\n", 4, 5, "hidden[0].activation", ErrMissingField, "want one of sigmoid, tanh"},
	{"version string", "version: one\ninputs: 2\noutput: {units: 2}\n", 1, 10, "version", ErrType, `want an integer, got "one"`},
	{"inputs mapping", "version: 1\ninputs: {a: 1}\noutput: {units: 2}\n", 2, 9, "inputs", ErrType, "want a count or a list of inputs (names or mappings), got a mapping"},
	{"inputs fraction", "version: 1\ninputs: 2.5\noutput: {units: 2}\n", 2, 9, "inputs", ErrType, "want an integer, got number 2.5"},
	{"hidden not list", head + "hidden: 3\noutput: {units: 2}\n", 3, 9, "hidden", ErrType, "want a list of layers"},
	{"layer not mapping", head + "hidden: [3]\noutput: {units: 2}\n", 3, 10, "hidden[0]", ErrType, "want a mapping, got integer 3"},
	{"classes scalar", head + "output: {classes: a}\n", 3, 19, "output.classes", ErrType, "want a list of class names"},
	{"class null", head + "output: {classes: [a, ~]}\n", 3, 23, "output.classes[1]", ErrType, "want a class name, got null"},
	{"multilabel string", head + "output: {units: 2, activation: sigmoid, multilabel: yes}\n", 3, 53, "output.multilabel", ErrType, `want true or false, got "yes"`},
	{"penalty bias number", head + "output: {units: 2}\npenalty: {bias: 1}\n", 4, 17, "penalty.bias", ErrType, "want true or false"},
	{"l2 string", head + "output: {units: 2}\npenalty: {l2: lots}\n", 4, 15, "penalty.l2", ErrType, `want a number, got "lots"`},
	{"tagged int", head + "output: {units: !!str 2}\n", 3, 17, "output.units", ErrType, `want an integer, got "2"`},
	{"key is a list", head + "output: {units: 2}\n[a]: 1\n", 4, 1, "?", ErrType, "want a key name"},
	{"seed fraction", head + "output: {units: 2}\ninit: {seed: 1.5}\n", 4, 14, "init.seed", ErrType, "want an integer ≥ 0, got number 1.5"},
	{"seed 2^64", head + "output: {units: 2}\ninit: {seed: 18446744073709551616}\n", 4, 14, "init.seed", ErrRange, "integer 18446744073709551616 is too large"},
	{"rate tagged non-number", head + "output: {units: 2}\ntrain: {rate: !!float abc}\n", 4, 15, "train.rate", ErrType, `want a number, got "abc" tagged !!float`},
	{"rate boolean", head + "output: {units: 2}\ntrain: {rate: true}\n", 4, 15, "train.rate", ErrType, "want a number, got true"},
	{"custom tag", head + "output: {units: !x 2}\n", 3, 17, "output.units", ErrType, `want an integer, got !x "2"`},
	{"long unknown key", head + "output: {units: 2}\n" + strings.Repeat("k", 60) + ": 1\n", 4, 1, strings.Repeat("k", 60), ErrUnknownField, `"` + strings.Repeat("k", 37) + `..."`},
	{"penalty list", head + "output: {units: 2}\npenalty: [1]\n", 4, 10, "penalty", ErrType, "want a mapping, got a list"},

	// Names.
	{"unknown activation", head + "hidden:\n  - units: 3\n    activation: tanhh\noutput: {units: 2}\n", 5, 17, "hidden[0].activation", ErrUnknownName,
		`unknown activation "tanhh" (want one of sigmoid, tanh, relu, leaky-relu, softplus, identity)`},
	{"softmax hidden", head + "hidden:\n  - units: 3\n    activation: softmax\noutput: {units: 2}\n", 5, 17, "hidden[0].activation", ErrRange, "only for the output layer"},
	{"tanh output", head + "output: {units: 2, activation: tanh}\n", 3, 32, "output.activation", ErrRange, "tanh is not an output activation (want one of softmax, sigmoid)"},
	{"unknown output activation", head + "output: {units: 2, activation: Softmax}\n", 3, 32, "output.activation", ErrUnknownName, `unknown activation "Softmax"`},
	{"unknown scheme", head + "output: {units: 2}\ninit: {scheme: xavier}\n", 4, 16, "init.scheme", ErrUnknownName, "want one of glorot-uniform, he-uniform, uniform"},
	{"unknown optimizer", head + "output: {units: 2}\ntrain: {optimizer: sgd}\n", 4, 20, "train.optimizer", ErrUnknownName, "want one of gd, cg, lbfgs, momentum, adam"},
	{"duplicate class", head + "output: {classes: [a, b, a]}\n", 3, 26, "output.classes[2]", ErrDuplicate, `duplicate class name "a" (also output.classes[0])`},
	{"empty class", head + "output: {classes: [a, '']}\n", 3, 23, "output.classes[1]", ErrRange, "empty class name"},
	{"duplicate feature", "version: 1\ninputs: [x, y, x]\noutput: {units: 2}\n", 2, 16, "inputs[2]", ErrDuplicate, `duplicate feature name "x"`},
	{"empty feature list", "version: 1\ninputs: []\noutput: {units: 2}\n", 2, 9, "inputs", ErrRange, "want at least 1 inputs, got 0"},

	// Ranges.
	{"version 2", "version: 2\ninputs: 2\noutput: {units: 2}\n", 1, 10, "version", ErrVersion, "unsupported version 2 (this package reads version 1)"},
	{"inputs zero", "version: 1\ninputs: 0\noutput: {units: 2}\n", 2, 9, "inputs", ErrRange, "want at least 1 inputs"},
	{"units zero", head + "hidden: [{units: 0, activation: relu}]\noutput: {units: 2}\n", 3, 18, "hidden[0].units", ErrRange, "want at least 1 units, got 0"},
	{"units negative", head + "hidden: [{units: -4, activation: relu}]\noutput: {units: 2}\n", 3, 18, "hidden[0].units", ErrRange, "got -4"},
	{"units 1e12", head + "hidden: [{units: 1e12, activation: relu}]\noutput: {units: 2}\n", 3, 18, "hidden[0].units", ErrTooLarge, "1000000000000 units exceed the param limit 50000000"},
	{"units 1e30", head + "hidden: [{units: 1e30, activation: relu}]\noutput: {units: 2}\n", 3, 18, "hidden[0].units", ErrRange, "integer 1e30 is too large"},
	{"units beyond int64", head + "hidden: [{units: 99999999999999999999, activation: relu}]\noutput: {units: 2}\n", 3, 18, "hidden[0].units", ErrRange, "too large"},
	{"inputs huge", "version: 1\ninputs: 9223372036854775807\noutput: {units: 2}\n", 2, 9, "inputs", ErrTooLarge, "exceed the param limit"},
	{"softmax one class", head + "output: {classes: [a]}\n", 3, 19, "output.classes", ErrRange, "want at least 2 classes for a softmax output, got 1"},
	{"softmax units one", head + "output: {units: 1}\n", 3, 17, "output.units", ErrRange, "want at least 2 classes for a softmax output, got 1"},
	{"sigmoid one class", head + "output: {classes: [a], activation: sigmoid}\n", 3, 19, "output.classes", ErrRange, "for a sigmoid output, got 1"},
	{"multilabel zero", head + "output: {classes: [], activation: sigmoid, multilabel: true}\n", 3, 19, "output.classes", ErrRange, "want at least 1 class for a multilabel sigmoid output, got 0"},
	{"units too many classes", head + "output: {units: 100000}\n", 3, 17, "output.units", ErrTooLarge, "100000 classes exceed the limit 65536"},
	{"multilabel softmax", head + "output: {units: 2, multilabel: true}\n", 3, 32, "output.multilabel", ErrConflict, "multilabel needs a sigmoid output"},
	{"negative l2", head + "output: {units: 2}\npenalty: {l2: -0.1}\n", 4, 15, "penalty.l2", ErrRange, "want a number ≥ 0, got -0.1"},
	{"nan l1", head + "output: {units: 2}\npenalty: {l1: .nan}\n", 4, 15, "penalty.l1", ErrRange, "want a finite number, got NaN"},
	{"inf rate", head + "output: {units: 2}\ntrain: {rate: .inf}\n", 4, 15, "train.rate", ErrRange, "want a finite number, got +Inf"},
	{"negative tolerance", head + "output: {units: 2}\ntrain: {tolerance: -1e-6}\n", 4, 20, "train.tolerance", ErrRange, "≥ 0"},
	{"negative iterations", head + "output: {units: 2}\ntrain: {iterations: -1}\n", 4, 21, "train.iterations", ErrRange, "want iterations ≥ 0, got -1"},
	{"negative batch", head + "output: {units: 2}\ntrain: {batch: -8}\n", 4, 16, "train.batch", ErrRange, "want batch ≥ 0"},
	{"negative seed", head + "output: {units: 2}\ninit: {seed: -1}\n", 4, 14, "init.seed", ErrRange, "want an integer ≥ 0, got -1"},
	{"uniform without scale", head + "output: {units: 2}\ninit:\n  scheme: uniform\n", 5, 3, "init.scale", ErrRange, "uniform needs a scale > 0"},
	{"uniform zero scale", head + "output: {units: 2}\ninit: {scheme: uniform, scale: 0}\n", 4, 32, "init.scale", ErrRange, "uniform needs a scale > 0"},
	{"negative scale", head + "output: {units: 2}\ninit: {scale: -1}\n", 4, 15, "init.scale", ErrRange, "≥ 0"},
	{"param limit", "version: 1\ninputs: 5000\nhidden:\n  - {units: 5000, activation: relu}\n  - {units: 5000, activation: relu}\noutput: {units: 2}\n",
		5, 13, "hidden[1].units", ErrTooLarge, "param count exceeds the limit 50000000"},
	{"param limit at output", "version: 1\ninputs: 50000\nhidden: [{units: 999, activation: relu}]\noutput: {units: 1000}\n",
		4, 17, "output.units", ErrTooLarge, "param count exceeds the limit"},

	// Typed inputs (issue 10).
	{"input type unknown", "version: 1\ninputs:\n  - {name: plan, type: text}\noutput: {units: 2}\n", 3, 24, "inputs[0].type", ErrUnknownName, `unknown input type "text" (want one of number, category)`},
	{"input type unknown with levels", "version: 1\ninputs:\n  - {name: plan, type: cat, levels: [a, b]}\noutput: {units: 2}\n", 3, 24, "inputs[0].type", ErrUnknownName, `unknown input type "cat"`},
	{"category one level", "version: 1\ninputs:\n  - name: plan\n    type: category\n    levels: [basic]\noutput: {units: 2}\n", 5, 13, "inputs[0].levels", ErrRange, "a category needs at least 2 levels, got 1"},
	{"category no levels", "version: 1\ninputs:\n  - {name: plan, type: category, levels: []}\noutput: {units: 2}\n", 3, 42, "inputs[0].levels", ErrRange, "at least 2 levels, got 0"},
	{"duplicate level", "version: 1\ninputs:\n  - name: plan\n    type: category\n    levels: [a, b, a]\noutput: {units: 2}\n", 5, 20, "inputs[0].levels[2]", ErrDuplicate, `duplicate level "a" (also inputs[0].levels[0])`},
	{"empty level", "version: 1\ninputs:\n  - {name: plan, type: category, levels: [a, '']}\noutput: {units: 2}\n", 3, 46, "inputs[0].levels[1]", ErrRange, "empty level name"},
	{"level with spaces", "version: 1\ninputs:\n  - {name: plan, type: category, levels: [a, ' b']}\noutput: {units: 2}\n", 3, 46, "inputs[0].levels[1]", ErrRange, `level " b" has surrounding spaces`},
	{"level null", "version: 1\ninputs:\n  - {name: plan, type: category, levels: [a, ~]}\noutput: {units: 2}\n", 3, 46, "inputs[0].levels[1]", ErrType, "want a level name, got null"},
	{"levels scalar", "version: 1\ninputs:\n  - {name: plan, type: category, levels: a}\noutput: {units: 2}\n", 3, 42, "inputs[0].levels", ErrType, `want a list of level names, got "a"`},
	{"levels on a number", "version: 1\ninputs:\n  - {name: plan, levels: [a, b]}\noutput: {units: 2}\n", 3, 26, "inputs[0].levels", ErrConflict, "levels are for a category input (add type: category)"},
	{"missing unknown word", "version: 1\ninputs:\n  - name: tenure\n    missing: average\noutput: {units: 2}\n", 4, 14, "inputs[0].missing", ErrUnknownName, `unknown missing rule "average" (want refuse, mean, median, mode or a number`},
	{"missing constant word", "version: 1\ninputs:\n  - {name: tenure, missing: constant}\noutput: {units: 2}\n", 3, 29, "inputs[0].missing", ErrUnknownName, "write the constant itself, e.g. missing: 0"},
	{"missing list", "version: 1\ninputs:\n  - {name: tenure, missing: [1]}\noutput: {units: 2}\n", 3, 29, "inputs[0].missing", ErrType, "want a missing rule (refuse, mean"},
	{"missing constant on a category", "version: 1\ninputs:\n  - name: plan\n    type: category\n    missing: 3\noutput: {units: 2}\n", 5, 14, "inputs[0].missing", ErrConflict, "a constant fill (3) is for a number input (a category takes refuse, level or mode)"},
	{"missing mean on a category", "version: 1\ninputs:\n  - {name: plan, type: category, missing: mean}\noutput: {units: 2}\n", 3, 43, "inputs[0].missing", ErrConflict, "missing: mean is for a number input"},
	{"missing level on a number", "version: 1\ninputs:\n  - name: tenure\n    missing: level\noutput: {units: 2}\n", 4, 14, "inputs[0].missing", ErrConflict, "missing: level is for a category input (a number takes refuse, mean, median, mode or a constant)"},
	{"missing nan", "version: 1\ninputs:\n  - {name: tenure, missing: .nan}\noutput: {units: 2}\n", 3, 29, "inputs[0].missing", ErrRange, "want a finite fill value, got NaN"},
	{"unknown on a number", "version: 1\ninputs:\n  - name: tenure\n    unknown: ignore\noutput: {units: 2}\n", 4, 14, "inputs[0].unknown", ErrConflict, "unknown is for a category input"},
	{"unknown rule word", "version: 1\ninputs:\n  - {name: plan, type: category, unknown: skip}\noutput: {units: 2}\n", 3, 43, "inputs[0].unknown", ErrUnknownName, `unknown unknown rule "skip" (want one of refuse, ignore)`},
	{"input key unknown", "version: 1\ninputs:\n  - {name: plan, kind: category}\noutput: {units: 2}\n", 3, 18, "inputs[0].kind", ErrUnknownField, "want one of name, type, levels, missing, unknown"},
	{"input without name", "version: 1\ninputs:\n  - a\n  - type: category\noutput: {units: 2}\n", 4, 5, "inputs[1].name", ErrMissingField, "missing key name"},
	{"input name null", "version: 1\ninputs:\n  - {name: ~, type: category}\noutput: {units: 2}\n", 3, 12, "inputs[0].name", ErrMissingField, "key name has no value"},
	{"input name list", "version: 1\ninputs:\n  - {name: [a]}\noutput: {units: 2}\n", 3, 12, "inputs[0].name", ErrType, "want an input name, got a list"},
	{"input entry null", "version: 1\ninputs: [a, ~]\noutput: {units: 2}\n", 2, 13, "inputs[1]", ErrType, "want an input name or a mapping with name, got null"},
	{"input entry list", "version: 1\ninputs: [a, [b]]\noutput: {units: 2}\n", 2, 13, "inputs[1]", ErrType, "got a list"},
	{"duplicate input name", "version: 1\ninputs:\n  - plan\n  - name: plan\n    type: category\noutput: {units: 2}\n", 4, 11, "inputs[1].name", ErrDuplicate, `duplicate feature name "plan" (also inputs[0])`},
	{"token is a level", "version: 1\ninputs:\n  - name: answer\n    type: category\n    levels: [yes, NA, no]\noutput: {units: 2}\n", 5, 19, "inputs[0].levels[1]", ErrConflict, `level "NA" is also a missing token`},
	{"declared token is a level", "version: 1\ninputs:\n  - {name: answer, type: category, levels: [yes, no, '-']}\nmissing_tokens: ['-']\noutput: {units: 2}\n", 3, 54, "inputs[0].levels[2]", ErrConflict, `level "-" is also a missing token`},
	{"duplicate token", head + "missing_tokens: ['?', NA, '?']\noutput: {units: 2}\n", 3, 27, "missing_tokens[2]", ErrDuplicate, `duplicate missing token "?" (also missing_tokens[0])`},
	{"token with spaces", head + "missing_tokens: [' NA']\noutput: {units: 2}\n", 3, 18, "missing_tokens[0]", ErrRange, "has surrounding spaces"},
	{"token null", head + "missing_tokens: [NA, ~]\noutput: {units: 2}\n", 3, 22, "missing_tokens[1]", ErrType, "want a missing token (text), got null"},
	{"tokens scalar", head + "missing_tokens: NA\noutput: {units: 2}\n", 3, 17, "missing_tokens", ErrType, `want a list of cell texts, got "NA"`},

	// Class weights (issue 11).
	{"class weight unknown class", head + "output: {classes: [ok, fraud]}\ntrain:\n  class_weights: {ok: 1, frod: 20}\n", 5, 26, "train.class_weights.frod", ErrUnknownName, `unknown class "frod" (want one of the output classes: ok, fraud)`},
	{"class weight zero", head + "output: {classes: [ok, fraud]}\ntrain:\n  class_weights:\n    fraud: 0\n", 6, 12, "train.class_weights.fraud", ErrRange, "want a weight > 0, got 0"},
	{"class weight negative", head + "output: {classes: [ok, fraud]}\ntrain:\n  class_weights:\n    fraud: -2\n", 6, 12, "train.class_weights.fraud", ErrRange, "want a weight > 0, got -2"},
	{"class weight inf", head + "output: {classes: [ok, fraud]}\ntrain: {class_weights: {fraud: .inf}}\n", 4, 32, "train.class_weights.fraud", ErrRange, "want a finite weight > 0, got +Inf"},
	{"class weight text", head + "output: {classes: [ok, fraud]}\ntrain: {class_weights: {fraud: high}}\n", 4, 32, "train.class_weights.fraud", ErrType, `want a number, got "high"`},
	{"class weight null", head + "output: {classes: [ok, fraud]}\ntrain: {class_weights: {fraud: ~}}\n", 4, 32, "train.class_weights.fraud", ErrType, "want a number, got null"},
	{"class weights unknown word", head + "output: {classes: [ok, fraud]}\ntrain:\n  class_weights: balance\n", 5, 18, "train.class_weights", ErrUnknownName, `unknown class weights "balance" (want balanced, or a mapping`},
	{"class weights list", head + "output: {classes: [ok, fraud]}\ntrain: {class_weights: [1, 20]}\n", 4, 24, "train.class_weights", ErrType, "got a list"},
	{"class weight duplicate", head + "output: {classes: [ok, fraud]}\ntrain: {class_weights: {fraud: 2, fraud: 3}}\n", 4, 35, "train.class_weights.fraud", ErrDuplicate, `duplicate class "fraud"`},
	{"class weight quoted name", head + "output: {classes: [ok, fraud]}\ntrain: {class_weights: {'fraud.x': 2}}\n", 4, 25, `train.class_weights["fraud.x"]`, ErrUnknownName, `unknown class "fraud.x"`},
	{"class weight numbered", head + "output: {units: 2}\ntrain: {class_weights: {2: 5}}\n", 4, 25, "train.class_weights.2", ErrUnknownName, "want one of the output classes: 0, 1"},

	// Syntax.
	{"tab indent", head + "output:\n\tunits: 2\n", 4, 1, "", ErrSyntax, "tab character in indentation"},
	{"tab after spaces", head + "output:\n  units: 2\n \tactivation: softmax\n", 5, 2, "", ErrSyntax, "tab character in indentation"},
	{"unclosed flow", head + "output: {units: 2\n", 3, 0, "", ErrSyntax, "syntax: did not find expected ',' or '}'"},
	{"bad indent", head + "output:\n  units: 2\n activation: softmax\n", 5, 0, "", ErrSyntax, "syntax: did not find expected key"},
	{"first line", "version: 1: 2\n", 1, 0, "", ErrSyntax, "mapping values are not allowed"},
	{"unknown alias", head + "output: *out\n", 3, 9, "", ErrSyntax, "alias *out refers to no anchor"},
	{"invalid utf8", head + "name: \xff\n", 3, 7, "", ErrSyntax, "invalid UTF-8 byte 0xff"},
	{"control char", head + "name: \"a\x01\"\n", 3, 9, "", ErrSyntax, "control character U+0001"},
}

func TestParseBad(t *testing.T) {
	for _, tt := range badTests {
		t.Run(tt.name, func(t *testing.T) {
			n, err := Parse(strings.NewReader(tt.src))
			require.Error(t, err, "Parse succeeded: %+v", n)
			var e *Error
			require.ErrorAs(t, err, &e)
			require.IsNotType(t, ErrorList{}, err, "want one problem, got:\n%v", err)
			assert.Equal(t, []any{tt.line, tt.col, tt.field}, []any{e.Line, e.Column, e.Field}, "line, column, field of %v", err)
			assert.ErrorIs(t, err, tt.kind)
			assert.ErrorContains(t, err, tt.substr)
		})
	}
}

func TestParseBadFiles(t *testing.T) {
	tests := []struct {
		file  string
		line  int
		col   int
		field string
		kind  error
	}{
		{"tab.yaml", 4, 1, "", ErrSyntax},
		{"duplicate.yaml", 5, 1, "inputs", ErrDuplicate},
		{"huge_units.yaml", 4, 12, "hidden[0].units", ErrTooLarge},
		{"null_inputs.yaml", 2, 9, "inputs", ErrMissingField},
		{"one_level.yaml", 6, 13, "inputs[1].levels", ErrRange},
		{"duplicate_levels.yaml", 5, 32, "inputs[0].levels[3]", ErrDuplicate},
		{"missing_word.yaml", 4, 14, "inputs[0].missing", ErrUnknownName},
		{"missing_constant_category.yaml", 5, 14, "inputs[0].missing", ErrConflict},
		{"token_level.yaml", 5, 20, "inputs[0].levels[2]", ErrConflict},
		{"class_weights_word.yaml", 6, 18, "train.class_weights", ErrUnknownName},
		// 31 + 311 + … bytes per nested list: the third *l4 passes 1 MiB.
		{"alias_bomb.yaml", 11, 20, "", ErrTooLarge},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			_, err := parseFile(t, filepath.Join("testdata", "bad", tt.file))
			var e *Error
			require.ErrorAs(t, err, &e)
			assert.Equal(t, []any{tt.line, tt.col, tt.field}, []any{e.Line, e.Column, e.Field}, "line, column, field of %v", e.Err)
			assert.ErrorIs(t, err, tt.kind)
		})
	}
}

// problemAt is one problem a spec file must report, at its place.
type problemAt struct {
	line, col int
	field     string
	kind      error
}

// checkProblems reads the spec file name from testdata/bad and checks that
// one pass reports exactly the problems want, in order: each once, at its
// line, column and key path, wrapping its sentinel.
func checkProblems(t *testing.T, name string, want []problemAt) ErrorList {
	t.Helper()
	_, err := parseFile(t, filepath.Join("testdata", "bad", name))
	var list ErrorList
	require.ErrorAs(t, err, &list)
	require.Len(t, list, len(want), "%v", err)
	for i, w := range want {
		e := list[i]
		assert.Equal(t, []any{w.line, w.col, w.field}, []any{e.Line, e.Column, e.Field}, "problem %d: %v", i, e)
		assert.ErrorIs(t, e, w.kind, "problem %d", i)
	}
	return list
}

// TestParseSeveral checks that one pass reports every problem, in order,
// and no follow-on problem twice.
func TestParseSeveral(t *testing.T) {
	list := checkProblems(t, "several.yaml", []problemAt{
		{1, 10, "version", ErrVersion},
		{2, 9, "inputs", ErrRange},
		{5, 17, "hidden[0].activation", ErrUnknownName},
		{6, 12, "hidden[1].units", ErrRange},
		{7, 17, "hidden[1].activation", ErrRange},
		{9, 19, "output.classes[2]", ErrDuplicate},
		{11, 15, "output.multilabel", ErrConflict},
		{13, 7, "penalty.l2", ErrRange},
		{14, 3, "penalty.l3", ErrUnknownField},
		{16, 3, "init.scale", ErrRange}, // absent: at its mapping
		{18, 9, "train.rate", ErrRange},
		{19, 14, "train.optimizer", ErrUnknownName},
	})
	for _, kind := range []error{ErrVersion, ErrUnknownField, ErrDuplicate} {
		assert.ErrorIs(t, list, kind, "the list")
	}
}

// TestParseSeveralTyped checks that the problems of typed inputs and class
// weights are all reported in one pass, each once, at its key or value.
func TestParseSeveralTyped(t *testing.T) {
	checkProblems(t, "typed_several.yaml", []problemAt{
		{4, 11, "inputs[0].type", ErrUnknownName},
		{7, 13, "inputs[1].levels", ErrRange},
		{10, 20, "inputs[2].levels[2]", ErrDuplicate},
		{12, 14, "inputs[3].missing", ErrUnknownName},
		{15, 14, "inputs[4].missing", ErrConflict},
		{17, 14, "inputs[5].missing", ErrConflict},
		{18, 14, "inputs[5].unknown", ErrConflict},
		{20, 13, "inputs[6].levels", ErrConflict},
		{23, 17, "inputs[7].levels[1]", ErrConflict},
		{28, 5, "train.class_weights.frod", ErrUnknownName}, // at the key
		{29, 9, "train.class_weights.ok", ErrRange},         // at the value
		{30, 12, "train.class_weights.fraud", ErrRange},
	})
}

func TestErrorFormat(t *testing.T) {
	tests := []struct {
		name string
		e    *Error
		want string
	}{
		{"all parts", &Error{Line: 3, Column: 17, Field: "hidden[1].activation", Err: newDetail(ErrUnknownName, "unknown activation %q", "tanhh")},
			`3:17: hidden[1].activation: unknown activation "tanhh"`},
		{"line only", &Error{Line: 3, Err: newDetail(ErrSyntax, "syntax: x")}, "3: syntax: x"},
		{"field only", &Error{Field: "inputs", Err: newDetail(ErrRange, "bad")}, "inputs: bad"},
		{"sentinel only", &Error{Err: ErrEmpty}, "spec: empty document"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			assert.Equal(t, tt.want, tt.e.Error())
		})
	}
	l := ErrorList{tests[0].e, tests[1].e}
	assert.Equal(t, tests[0].want+"\n"+tests[1].want, l.Error(), "list")
}
