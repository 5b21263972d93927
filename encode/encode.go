package encode

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/seine-ml/seine/spec"
)

// Errors of building an encoder or encoding a value; each is wrapped with
// detail (the input's name, and for a file the line, row and column).
var (
	ErrEncoder      = errors.New("encode: invalid encoder")           // New got contradictory inputs
	ErrFit          = errors.New("encode: cannot fit")                // the training rows cannot fit an input
	ErrMissingField = errors.New("encode: missing field")             // a record lacks an input
	ErrMissingValue = errors.New("encode: missing value")             // a missing value where the input's rule is refuse
	ErrUnknownLevel = errors.New("encode: unknown level")             // a level never seen in training where the rule is refuse
	ErrType         = errors.New("encode: value of the wrong type")   // text for a number that does not parse, a number for a category
	ErrColumns      = errors.New("encode: columns do not match")      // a data set or layout whose columns are not the encoder's
	ErrNotFinite    = errors.New("encode: not a finite number")       // NaN or ±Inf given as a number
	ErrNoSet        = errors.New("encode: no data")                   // a nil or empty data set
	ErrLevels       = errors.New("encode: a category needs 2 levels") // fewer than two levels
)

// Input is one raw input of a fitted encoder and everything needed to turn
// its value into input units.
//
// A number x becomes one unit (x' − Mean)/Scale, where x' is x, or Fill when
// x is missing. A category with L levels becomes L units, one-hot in Levels
// order, and L+1 with spec.MissingLevel, whose last unit marks a missing
// value; an unknown level under spec.UnknownIgnore sets all of them to 0.
type Input struct {
	Name    string
	Type    spec.InputType
	Levels  []string         // category: the levels in unit order; nil for a number
	Missing spec.MissingRule // what fills a missing value
	Unknown spec.UnknownRule // category: what an unknown level does
	// Fill replaces a missing number (NaN under spec.MissingRefuse). For a
	// category under spec.MissingMode it is the index in Levels of the
	// level that replaces a missing value; otherwise it is unused (NaN).
	Fill  float64
	Mean  float64 // number: the centre subtracted (0 when not scaled)
	Scale float64 // number: the divisor, finite and > 0 (1 when not scaled)
	// Offset is the index of the input's first unit; New sets it.
	Offset int
}

// Units returns the number of units of in.
func (in *Input) Units() int {
	if in.Type != spec.CategoryInput {
		return 1
	}
	if in.Missing == spec.MissingLevel {
		return len(in.Levels) + 1
	}
	return len(in.Levels)
}

// Encoder is the fitted path from a raw record to a net's input vector:
// the inputs' levels, fill values and scaling. It is read-only once built
// and safe for concurrent use.
//
// Values pass through two steps. Coding checks a raw value against its
// input's rules and turns it into one float64 per input: the number itself,
// the index of a category's level (−1 for an unknown level under
// spec.UnknownIgnore), or NaN for a missing value that the rule fills. It
// is the step that can fail (Layout.Code, CodeRecord, EncodeSet). Expanding
// turns such a coded row into the units (Expand); it cannot fail and
// allocates nothing.
type Encoder struct {
	inputs []Input
	tokens []string
	width  int
	byName map[string]int   // input name → index
	levels []map[string]int // per input: level → index (nil for numbers)
}

// New checks inputs against each other and returns an encoder over them, in
// this order; their Offsets are set here. missingTokens are the cell texts
// that count as missing (nil means spec.DefaultMissingTokens). New is the
// one place where an encoder, fitted or read from a model file, is checked.
func New(inputs []Input, missingTokens []string) (*Encoder, error) {
	if len(inputs) == 0 {
		return nil, fmt.Errorf("%w: no inputs", ErrEncoder)
	}
	if missingTokens == nil {
		missingTokens = spec.DefaultMissingTokens
	}
	e := &Encoder{
		inputs: make([]Input, len(inputs)),
		tokens: slices.Clone(missingTokens),
		byName: make(map[string]int, len(inputs)),
		levels: make([]map[string]int, len(inputs)),
	}
	for _, t := range e.tokens {
		if strings.TrimSpace(t) != t {
			return nil, fmt.Errorf("%w: missing token %q has surrounding spaces", ErrEncoder, t)
		}
	}
	for i, in := range inputs {
		in.Levels = slices.Clone(in.Levels)
		if in.Name == "" {
			return nil, fmt.Errorf("%w: input %d has no name", ErrEncoder, i+1)
		}
		if j, dup := e.byName[in.Name]; dup {
			return nil, fmt.Errorf("%w: inputs %d and %d are both named %q", ErrEncoder, j+1, i+1, in.Name)
		}
		e.byName[in.Name] = i
		if err := check(&in, e.tokens); err != nil {
			return nil, fmt.Errorf("%w: input %q: %w", ErrEncoder, in.Name, err)
		}
		if in.Type == spec.CategoryInput {
			m := make(map[string]int, len(in.Levels))
			for k, l := range in.Levels {
				m[l] = k
			}
			e.levels[i] = m
		}
		in.Offset = e.width
		e.width += in.Units()
		e.inputs[i] = in
	}
	return e, nil
}

// check reports what is wrong with one input on its own.
func check(in *Input, tokens []string) error {
	switch in.Type {
	case spec.NumberInput:
		if in.Levels != nil {
			return errors.New("a number has no levels")
		}
		switch in.Missing {
		case spec.MissingRefuse:
		case spec.MissingMean, spec.MissingMedian, spec.MissingMode, spec.MissingConstant:
			if !finite(in.Fill) {
				return fmt.Errorf("fill value %v is not finite", in.Fill)
			}
		default:
			return fmt.Errorf("missing rule %v does not apply to a number", in.Missing)
		}
		if in.Unknown != spec.UnknownRefuse {
			return errors.New("the unknown-level rule applies to categories only")
		}
		if !finite(in.Mean) || !finite(in.Scale) || !(in.Scale > 0) {
			return fmt.Errorf("scaling (mean %v, scale %v) needs finite values and a scale > 0", in.Mean, in.Scale)
		}
	case spec.CategoryInput:
		if len(in.Levels) < 2 {
			return fmt.Errorf("%w, it has %d", ErrLevels, len(in.Levels))
		}
		seen := make(map[string]bool, len(in.Levels))
		for _, l := range in.Levels {
			switch {
			case l == "" || strings.TrimSpace(l) != l:
				return fmt.Errorf("level %q is empty or has surrounding spaces", l)
			case seen[l]:
				return fmt.Errorf("level %q is listed twice", l)
			case slices.Contains(tokens, l):
				return fmt.Errorf("level %q is also a missing token", l)
			}
			seen[l] = true
		}
		switch in.Missing {
		case spec.MissingRefuse, spec.MissingLevel:
		case spec.MissingMode:
			if k := in.Fill; !(k >= 0 && k < float64(len(in.Levels))) || k != math.Trunc(k) {
				return fmt.Errorf("the mode's level index %v is not in [0, %d)", k, len(in.Levels))
			}
		default:
			return fmt.Errorf("missing rule %v does not apply to a category", in.Missing)
		}
		if in.Unknown != spec.UnknownRefuse && in.Unknown != spec.UnknownIgnore {
			return fmt.Errorf("unknown-level rule %d", int(in.Unknown))
		}
	default:
		return fmt.Errorf("type %v", in.Type)
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Inputs returns a copy of the encoder's inputs, in order.
func (e *Encoder) Inputs() []Input {
	out := slices.Clone(e.inputs)
	for i := range out {
		out[i].Levels = slices.Clone(out[i].Levels)
	}
	return out
}

// NumInputs returns the number of raw inputs: the length of a coded row.
func (e *Encoder) NumInputs() int { return len(e.inputs) }

// Width returns the number of input units: the length of an expanded row.
func (e *Encoder) Width() int { return e.width }

// Names returns the inputs' names in order.
func (e *Encoder) Names() []string {
	out := make([]string, len(e.inputs))
	for i := range e.inputs {
		out[i] = e.inputs[i].Name
	}
	return out
}

// MissingTokens returns the cell texts that count as missing.
func (e *Encoder) MissingTokens() []string { return slices.Clone(e.tokens) }

// HasCategories reports whether any input is a category.
func (e *Encoder) HasCategories() bool {
	for i := range e.inputs {
		if e.inputs[i].Type == spec.CategoryInput {
			return true
		}
	}
	return false
}

// Equal reports whether e and o encode every value the same way: the same
// inputs, levels, rules and missing tokens, and the same fill values and
// scaling bit for bit where they are used.
func (e *Encoder) Equal(o *Encoder) bool {
	if len(e.inputs) != len(o.inputs) || !slices.Equal(e.tokens, o.tokens) {
		return false
	}
	for i := range e.inputs {
		a, b := &e.inputs[i], &o.inputs[i]
		if a.Name != b.Name || a.Type != b.Type || !slices.Equal(a.Levels, b.Levels) || a.Missing != b.Missing || a.Unknown != b.Unknown {
			return false
		}
		same := func(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) || (x != x && y != y) }
		switch {
		case a.Type == spec.NumberInput && !(same(a.Mean, b.Mean) && same(a.Scale, b.Scale) && (a.Missing == spec.MissingRefuse || same(a.Fill, b.Fill))):
			return false
		case a.Type == spec.CategoryInput && a.Missing == spec.MissingMode && a.Fill != b.Fill:
			return false
		}
	}
	return true
}

// Expand writes the units of the coded row x (one value per input, see
// Encoder) into dst and returns it. len(x) must be NumInputs and len(dst)
// Width, or it panics. A missing number under spec.MissingRefuse stays NaN;
// a missing category under spec.MissingRefuse and a level index out of
// range give all zeros. It allocates nothing.
//
//	number:    u = (x or Fill when x is NaN − Mean) / Scale, computed as
//	           x/Scale − Mean/Scale where x − Mean overflows
//	category:  u_k = 1 for k = level index (or Fill's index under
//	           MissingMode, or k = L under MissingLevel when x is NaN), else 0
func (e *Encoder) Expand(dst, x []float64) []float64 {
	if len(x) != len(e.inputs) || len(dst) != e.width {
		panic(fmt.Sprintf("encode: Expand of %d values into %d units; the encoder takes %d into %d", len(x), len(dst), len(e.inputs), e.width))
	}
	for i := range e.inputs {
		in := &e.inputs[i]
		v := x[i]
		if in.Type == spec.NumberInput {
			if v != v { // NaN: missing
				v = in.Fill
			}
			d := v - in.Mean
			if math.IsInf(d, 0) { // v and Mean far apart near the float64 range
				dst[in.Offset] = v/in.Scale - in.Mean/in.Scale
				continue
			}
			dst[in.Offset] = d / in.Scale
			continue
		}
		u := dst[in.Offset : in.Offset+in.Units()]
		clear(u)
		if v != v {
			switch in.Missing {
			case spec.MissingLevel:
				u[len(u)-1] = 1
			case spec.MissingMode:
				u[int(in.Fill)] = 1
			}
			continue
		}
		if v >= 0 && v < float64(len(in.Levels)) {
			u[int(v)] = 1
		}
	}
	return dst
}

// isMissing reports whether the cell text t (spaces trimmed) is a missing
// token.
func (e *Encoder) isMissing(t string) bool { return slices.Contains(e.tokens, t) }

// codeText codes the text t of input i; t is trimmed of spaces first.
func (e *Encoder) codeText(i int, t string) (float64, error) {
	in := &e.inputs[i]
	t = strings.TrimSpace(t)
	if e.isMissing(t) {
		return e.codeMissing(i)
	}
	if in.Type == spec.NumberInput {
		v, err := strconv.ParseFloat(t, 64)
		if err != nil {
			return 0, describe(ErrType, "%q is not a number; declare `type: category` for a text input", cut(t))
		}
		return e.codeNumber(i, v)
	}
	if k, ok := e.levels[i][t]; ok {
		return float64(k), nil
	}
	if in.Unknown == spec.UnknownIgnore {
		return -1, nil
	}
	return 0, describe(ErrUnknownLevel, "%q is not one of the levels seen in training (%s); set `unknown: ignore` in the spec to accept unknown levels", cut(t), levelList(in.Levels))
}

// codeNumber codes the number v of input i.
func (e *Encoder) codeNumber(i int, v float64) (float64, error) {
	in := &e.inputs[i]
	if in.Type == spec.CategoryInput {
		return 0, describe(ErrType, "got the number %v, want one of the category's levels as text", v)
	}
	if !finite(v) {
		return 0, describe(ErrNotFinite, "%v is not a finite number", v)
	}
	return v, nil
}

// codeMissing codes a missing value of input i.
func (e *Encoder) codeMissing(i int) (float64, error) {
	if e.inputs[i].Missing == spec.MissingRefuse {
		return 0, describe(ErrMissingValue, "missing value; the input's missing rule is refuse: set `missing:` in the spec to fill it")
	}
	return math.NaN(), nil
}

const maxShown = 40

func cut(s string) string {
	if len(s) <= maxShown {
		return s
	}
	r := []rune(s)
	if len(r) <= maxShown {
		return s
	}
	return string(r[:maxShown]) + "…"
}

// levelList quotes up to ten levels.
func levelList(levels []string) string {
	const most = 10
	var b strings.Builder
	for i, l := range levels {
		if i > 0 {
			b.WriteString(", ")
		}
		if i == most {
			fmt.Fprintf(&b, "… %d in all", len(levels))
			break
		}
		b.WriteString(strconv.Quote(cut(l)))
	}
	return b.String()
}

// Numbers returns the encoder of plain number inputs that refuse missing
// values, scaled as (x − mean[i])/scale[i]: the encoder of a model whose
// inputs are all numbers. names may be nil ("x1", "x2", …); mean and scale
// may both be nil (no scaling), else they have one entry per input.
func Numbers(names []string, mean, scale []float64) (*Encoder, error) {
	n := max(len(names), len(mean))
	if (mean == nil) != (scale == nil) || (mean != nil && len(mean) != len(scale)) || (names != nil && mean != nil && len(names) != len(mean)) || n == 0 {
		return nil, fmt.Errorf("%w: %d names, %d means and %d scales", ErrEncoder, len(names), len(mean), len(scale))
	}
	in := make([]Input, n)
	for i := range in {
		in[i] = Input{Name: "x" + strconv.Itoa(i+1), Fill: math.NaN(), Scale: 1}
		if names != nil {
			in[i].Name = names[i]
		}
		if mean != nil {
			in[i].Mean, in[i].Scale = mean[i], scale[i]
		}
	}
	return New(in, nil)
}
