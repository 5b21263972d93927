package spec

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func valid() *Network {
	return &Network{
		Version: 1, Inputs: 3,
		Hidden: []Layer{{4, Tanh}},
		Output: Output{Classes: []string{"a", "b"}, Activation: Softmax},
		Init:   Init{Scheme: GlorotUniform, Seed: 1},
	}
}

func TestValidate(t *testing.T) {
	tests := []struct {
		name   string
		change func(n *Network)
		fields []string // want these fields, in order; nil = valid
		kinds  []error
	}{
		{"valid", func(*Network) {}, nil, nil},
		{"no hidden", func(n *Network) { n.Hidden = nil }, nil, nil},
		{"sigmoid two classes", func(n *Network) { n.Output.Activation = Sigmoid }, nil, nil},
		{"multilabel one class", func(n *Network) {
			n.Output = Output{Classes: []string{"x"}, Activation: Sigmoid, Multilabel: true}
		}, nil, nil},
		{"zero value", func(n *Network) { *n = Network{} },
			[]string{"version", "inputs", "output.activation", "output.classes", "init.scheme"},
			[]error{ErrVersion, ErrRange, ErrMissingField, ErrRange, ErrMissingField}},
		{"features mismatch", func(n *Network) { n.Features = []string{"x", "y"} }, []string{"inputs"}, []error{ErrRange}},
		{"features duplicate", func(n *Network) { n.Features = []string{"x", "y", "x"} }, []string{"inputs[2]"}, []error{ErrDuplicate}},
		{"hidden zero activation", func(n *Network) { n.Hidden[0].Activation = 0 }, []string{"hidden[0].activation"}, []error{ErrMissingField}},
		{"hidden bad activation", func(n *Network) { n.Hidden[0].Activation = 99 }, []string{"hidden[0].activation"}, []error{ErrRange}},
		{"output relu", func(n *Network) { n.Output.Activation = ReLU }, []string{"output.activation"}, []error{ErrRange}},
		{"scheme out of range", func(n *Network) { n.Init.Scheme = -1 }, []string{"init.scheme"}, []error{ErrRange}},
		{"optimizer out of range", func(n *Network) { n.Train.Optimizer = 6 }, []string{"train.optimizer"}, []error{ErrRange}},
		{"nan scale", func(n *Network) { n.Init.Scale = math.NaN() }, []string{"init.scale"}, []error{ErrRange}},
		{"inf l2", func(n *Network) { n.Penalty.L2 = math.Inf(1) }, []string{"penalty.l2"}, []error{ErrRange}},
		{"huge units", func(n *Network) { n.Hidden[0].Units = math.MaxInt }, []string{"hidden[0].units"}, []error{ErrTooLarge}},
		{"typed", func(n *Network) {
			n.Features = []string{"x", "plan", "region"}
			n.Types = []Input{{Missing: MissingConstant, Fill: -2}, {Type: CategoryInput, Levels: []string{"a", "b"}},
				{Type: CategoryInput, Missing: MissingLevel, Unknown: UnknownIgnore}}
			n.MissingTokens = []string{}
			n.Train.ClassWeights.By = map[string]float64{"b": 3}
		}, nil, nil},
		{"types without features", func(n *Network) { n.Types = make([]Input, 3) }, []string{"inputs"}, []error{ErrConflict}},
		{"types length", func(n *Network) {
			n.Features = []string{"x", "y", "z"}
			n.Types = make([]Input, 2)
		}, []string{"inputs"}, []error{ErrRange}},
		{"input out of range", func(n *Network) {
			n.Features = []string{"x", "y", "z"}
			n.Types = []Input{{Type: 2}, {Missing: 6}, {Type: CategoryInput, Unknown: -1}}
		}, []string{"inputs[0].type", "inputs[1].missing", "inputs[2].unknown"}, []error{ErrRange, ErrRange, ErrRange}},
		{"fill without constant", func(n *Network) {
			n.Features = []string{"x", "y", "z"}
			n.Types = []Input{{Missing: MissingMean, Fill: 1}, {Missing: MissingConstant, Fill: math.Inf(-1)}, {}}
		}, []string{"inputs[0].missing", "inputs[1].missing"}, []error{ErrConflict, ErrRange}},
		{"empty levels given", func(n *Network) {
			n.Features = []string{"x", "y", "z"}
			n.Types = []Input{{Type: CategoryInput, Levels: []string{}}, {}, {}}
		}, []string{"inputs[0].levels"}, []error{ErrRange}},
		{"nil tokens are the default", func(n *Network) {
			n.Features = []string{"x", "y", "z"}
			n.Types = []Input{{Type: CategoryInput, Levels: []string{"?", "ok"}}, {}, {}}
		}, []string{"inputs[0].levels[0]"}, []error{ErrConflict}},
		{"empty tokens collide with nothing", func(n *Network) {
			n.Features = []string{"x", "y", "z"}
			n.Types = []Input{{Type: CategoryInput, Levels: []string{"?", ""}}, {}, {}}
			n.MissingTokens = []string{}
		}, []string{"inputs[0].levels[1]"}, []error{ErrRange}},
		{"duplicate tokens", func(n *Network) { n.MissingTokens = []string{"NA", "", "NA"} }, []string{"missing_tokens[2]"}, []error{ErrDuplicate}},
		{"class weights both", func(n *Network) {
			n.Train.ClassWeights = ClassWeights{Balanced: true, By: map[string]float64{"a": 2}}
		}, []string{"train.class_weights"}, []error{ErrConflict}},
		{"class weights sorted", func(n *Network) {
			n.Train.ClassWeights.By = map[string]float64{"z": 1, "b": math.NaN(), "a": 0}
		}, []string{"train.class_weights.a", "train.class_weights.b", "train.class_weights.z"}, []error{ErrRange, ErrRange, ErrUnknownName}},
		{
			// (MaxInt/2+1)·(k+1) would overflow int; each width alone is
			// within an unbounded limit, so only the overflow-safe sum can
			// catch it.
			"overflowing count", func(n *Network) {
				n.Inputs = 1 << 40
				n.Hidden[0].Units = 1 << 40
			}, []string{"hidden[0].units"}, []error{ErrTooLarge},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			n := valid()
			tt.change(n)
			lim := Limits{}
			if tt.name == "overflowing count" {
				lim.MaxParams = math.MaxInt
			}
			err := n.ValidateLimits(lim)
			var got []*Error
			switch e := err.(type) {
			case nil:
			case *Error:
				got = []*Error{e}
			case ErrorList:
				got = e
			default:
				require.FailNowf(t, "unexpected error type", "error of type %T: %v", err, err)
			}
			require.Len(t, got, len(tt.fields), "problems: %v", err)
			for i, e := range got {
				assert.Equal(t, []any{tt.fields[i], 0, 0}, []any{e.Field, e.Line, e.Column}, "problem %d: field, line, column of %v", i, e)
				assert.ErrorIs(t, e, tt.kinds[i], "problem %d", i)
			}
		})
	}
}

func TestParamCheck(t *testing.T) {
	// Sizes 3 → 4 → 2: (3+1)·4 + (4+1)·2 = 26 params.
	n := valid()
	require.Equal(t, 26, n.ParamCount(), "ParamCount")
	tests := []struct {
		name  string
		limit int
		ok    bool
		field string
	}{
		{"exact", 26, true, ""},
		{"one short", 25, false, "output.classes"},
		{"hidden layer exact", 16, false, "output.classes"},
		{"hidden layer one short", 15, false, "hidden[0].units"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			field, c, ok := paramCheck(n, tt.limit)
			assert.Equal(t, tt.ok, ok, "ok at limit %d", tt.limit)
			assert.Equal(t, tt.field, field, "field at limit %d", tt.limit)
			if ok {
				assert.Equal(t, 26, c, "count at limit %d", tt.limit)
			}
		})
	}
}

func TestLimits(t *testing.T) {
	src := head + "hidden: [{units: 10, activation: relu}]\noutput: {units: 5}\n" // 3·10 + 11·5 = 85 params
	tests := []struct {
		name  string
		lim   Limits
		kind  error
		field string
	}{
		{"defaults", Limits{}, nil, ""},
		{"negative means default", Limits{MaxBytes: -1, MaxParams: -1, MaxClasses: -1}, nil, ""},
		{"bytes exact", Limits{MaxBytes: int64(len(src))}, nil, ""},
		{"bytes one short", Limits{MaxBytes: int64(len(src)) - 1}, ErrTooLarge, ""},
		{"params exact", Limits{MaxParams: 85}, nil, ""},
		{"params one short", Limits{MaxParams: 84}, ErrTooLarge, "output.units"},
		{"classes exact", Limits{MaxClasses: 5}, nil, ""},
		{"classes one short", Limits{MaxClasses: 4}, ErrTooLarge, "output.units"},
		{"levels unlimited", Limits{MaxLevels: 1}, nil, ""}, // no category here
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ParseLimits(strings.NewReader(src), tt.lim)
			if tt.kind == nil {
				require.NoError(t, err)
				return
			}
			require.ErrorIs(t, err, tt.kind)
			var e *Error
			if errors.As(err, &e) {
				assert.Equal(t, tt.field, e.Field, "field")
			}
		})
	}
}

func TestLimitsLevels(t *testing.T) {
	// A category of 3 declared levels, one of 2 with a missing level and a
	// number: 3 + 3 + 1 = 7 input units; 8·10 + 11·2 = 102 params.
	src := "version: 1\ninputs:\n  - {name: a, type: category, levels: [x, y, z]}\n" +
		"  - {name: b, type: category, levels: [u, v], missing: level}\n  - c\n" +
		"hidden: [{units: 10, activation: relu}]\noutput: {units: 2}\n"
	tests := []struct {
		name  string
		lim   Limits
		kind  error
		line  int
		col   int
		field string
	}{
		{"defaults", Limits{}, nil, 0, 0, ""},
		{"levels exact", Limits{MaxLevels: 3}, nil, 0, 0, ""},
		{"levels one short", Limits{MaxLevels: 2}, ErrTooLarge, 3, 39, "inputs[0].levels"},
		{"params exact", Limits{MaxParams: 102}, nil, 0, 0, ""},
		{"params one short", Limits{MaxParams: 101}, ErrTooLarge, 7, 17, "output.units"},
		{"input units over the param limit", Limits{MaxParams: 6}, ErrTooLarge, 3, 3, "inputs"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			n, err := ParseLimits(strings.NewReader(src), tt.lim)
			if tt.kind == nil {
				require.NoError(t, err)
				assert.Equal(t, []int{7, 10, 2}, n.Sizes())
				assert.Equal(t, 102, n.ParamCount())
				return
			}
			require.ErrorIs(t, err, tt.kind)
			var e *Error
			require.ErrorAs(t, err, &e)
			assert.Equal(t, []any{tt.line, tt.col, tt.field}, []any{e.Line, e.Column, e.Field}, "%v", err)
		})
	}
	// Validate applies the same bound to a Network built in Go.
	n := valid()
	n.Features = []string{"x", "y", "z"}
	n.Types = []Input{{Type: CategoryInput, Levels: []string{"a", "b", "c"}}, {}, {}}
	err := n.ValidateLimits(Limits{MaxLevels: 2})
	require.ErrorIs(t, err, ErrTooLarge)
	var e *Error
	require.ErrorAs(t, err, &e)
	assert.Equal(t, "inputs[0].levels", e.Field)
}

// TestSizesTyped checks the input width of typed inputs: one unit per
// level, one more with missing: level, a lower bound of one unit for a
// category whose levels are still to be learned.
func TestSizesTyped(t *testing.T) {
	n := valid() // 3 inputs, 4 hidden, 2 classes
	n.Features = []string{"x", "plan", "region"}
	n.Types = []Input{{}, {Type: CategoryInput, Levels: []string{"a", "b", "c"}}, {Type: CategoryInput, Missing: MissingLevel}}
	assert.False(t, n.Resolved())
	assert.Equal(t, 0, n.Width())
	assert.Equal(t, []int{5, 4, 2}, n.Sizes()) // 1 + 3 + (unresolved: 1)
	n.Types[2].Levels = []string{"n", "s"}
	assert.True(t, n.Resolved())
	assert.Equal(t, 7, n.Width()) // 1 + 3 + (2 + 1)
	// (7+1)·4 + (4+1)·2 = 42.
	assert.Equal(t, 42, n.ParamCount())
	require.NoError(t, n.Validate())
}

// countReader yields n bytes of a repeated spec line without holding them.
type countReader struct {
	n, read int64
}

func (r *countReader) Read(p []byte) (int, error) {
	if r.read >= r.n {
		return 0, io.EOF
	}
	const line = "# padding padding padding padding padding padding\n"
	k := int64(len(p))
	if k > r.n-r.read {
		k = r.n - r.read
	}
	for i := int64(0); i < k; i++ {
		p[i] = line[(r.read+i)%int64(len(line))]
	}
	r.read += k
	return int(k), nil
}

func TestTooLargeFailsFast(t *testing.T) {
	r := &countReader{n: 10 << 20}
	_, err := Parse(r)
	require.ErrorIs(t, err, ErrTooLarge)
	// Parse must stop after MaxBytes+1 bytes, not read all 10 MB.
	assert.Equal(t, int64(DefaultMaxBytes+1), r.read, "bytes read")
	assert.ErrorContains(t, err, "larger than the limit of 1048576 bytes", "message")
}

type errReader struct{}

func (errReader) Read([]byte) (int, error) { return 0, errors.New("boom") }

func TestReadError(t *testing.T) {
	_, err := Parse(errReader{})
	assert.ErrorContains(t, err, "boom", "want the read error")
}

func TestClone(t *testing.T) {
	n := valid()
	n.Features = []string{"x", "y", "z"}
	n.Types = []Input{{}, {Type: CategoryInput, Levels: []string{"p", "q"}}, {Missing: MissingConstant, Fill: 1}}
	n.MissingTokens = []string{"", "NA"}
	n.Train.ClassWeights.By = map[string]float64{"a": 2}
	c := n.Clone()
	require.Equal(t, n, c, "clone differs")
	c.Features[0], c.Hidden[0].Units, c.Output.Classes[0] = "q", 99, "q"
	c.Types[1].Levels[0], c.Types[2].Fill, c.MissingTokens[1], c.Train.ClassWeights.By["a"] = "r", 5, "?", 3
	assert.Equal(t,
		[]any{"x", 4, "a", "p", 1.0, "NA", 2.0},
		[]any{n.Features[0], n.Hidden[0].Units, n.Output.Classes[0], n.Types[1].Levels[0], n.Types[2].Fill, n.MissingTokens[1], n.Train.ClassWeights.By["a"]},
		"clone shares memory with the original: %#v", n)
	// nil stays nil, so a clone of a parsed spec round-trips like the spec.
	m := valid().Clone()
	assert.Nil(t, m.Types)
	assert.Nil(t, m.MissingTokens)
	assert.Nil(t, m.Train.ClassWeights.By)
	assert.Nil(t, (*Network)(nil).Clone(), "Clone of nil")
}

// A spec with thousands of duplicate class names reports them all in the
// list, but its message lists 20 and counts the rest (issue 13).
func TestErrorListCapped(t *testing.T) {
	var b strings.Builder
	b.WriteString("version: 1\ninputs: 2\noutput:\n  classes: [")
	for i := range 5000 {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString("same")
	}
	b.WriteString("]\n")
	_, err := Parse(strings.NewReader(b.String()))
	var list ErrorList
	require.ErrorAs(t, err, &list)
	lines := strings.Split(err.Error(), "\n")
	// Not assert.Len: on failure it would print all the lines.
	assert.Equal(t, MaxListed+1, len(lines), "%d problems gave %d lines, last %q", len(list), len(lines), lines[len(lines)-1])
	assert.Equal(t, fmt.Sprintf("and %d more problems", len(list)-MaxListed), lines[len(lines)-1], "last line")
}
