package encode

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/spec"
)

// MaxLevels bounds the levels an encoder learns for one category input. A
// column with more distinct values is more likely an identifier than a
// category.
const MaxLevels = 65_536

// Options say how Fit fits an encoder. The zero value standardises numbers.
type Options struct {
	// NoScale leaves numbers as they are (Mean 0, Scale 1) instead of
	// standardising them.
	NoScale bool
}

// ColumnsFor returns how a CSV file must be read for the spec s: one
// data.Column per raw input, a text column for each category and missing
// cells allowed where the input's rule fills them. It returns nil for a
// spec whose inputs are a count (every column a number, missing refused).
func ColumnsFor(s *spec.Network) []data.Column {
	if s.Features == nil {
		return nil
	}
	cols := make([]data.Column, len(s.Features))
	for i, name := range s.Features {
		cols[i] = data.Column{Name: name}
		if s.Types != nil {
			t := s.Types[i]
			cols[i].Text = t.Type == spec.CategoryInput
			cols[i].Missing = t.Missing != spec.MissingRefuse
		}
	}
	return cols
}

// Columns returns how a CSV file must be read for e (see ColumnsFor).
func (e *Encoder) Columns() []data.Column {
	cols := make([]data.Column, len(e.inputs))
	for i := range e.inputs {
		in := &e.inputs[i]
		cols[i] = data.Column{Name: in.Name, Text: in.Type == spec.CategoryInput, Missing: in.Missing != spec.MissingRefuse}
	}
	return cols
}

// Fit fits an encoder for the spec s on the training rows set, as read with
// ColumnsFor(s) (raw values: numbers, text indices into set.Texts, NaN for
// missing cells). Fit only ever looks at these rows: fit it on training
// rows and encode holdout and prediction rows with the result.
//
// For each number it sets the fill value by the input's missing rule (the
// mean, the median — the middle value, or the mean of the two middle
// values — the mode — the most frequent value, the smallest on ties — or
// the spec's constant), then standardises the filled column:
// Mean is its mean and Scale its sample standard deviation (divisor n − 1,
// computed so that it cannot overflow for finite values; 1 for a constant
// column, which is then reported among the warnings). For each category without declared levels it learns the
// distinct texts of the training rows, ordered numerically when every one
// is an integer and by byte order otherwise, so that the order does not
// depend on the order of the rows; under MissingMode the fill level is the
// most frequent one (the first in level order on ties).
//
// Inputs are named by s.Features, or by set.Features when s gives a count.
func Fit(s *spec.Network, set *data.Set, opt Options) (e *Encoder, warnings []string, err error) {
	if s == nil || set == nil || set.Rows() == 0 {
		return nil, nil, fmt.Errorf("%w: no training rows", ErrNoSet)
	}
	r, c := set.X.Dims()
	if c != s.Inputs {
		return nil, nil, fmt.Errorf("%w: the set has %d input columns, the spec %d inputs", ErrColumns, c, s.Inputs)
	}
	names := s.Features
	if names == nil {
		names = set.Features
	} else if set.Features != nil && !slices.Equal(set.Features, names) {
		return nil, nil, fmt.Errorf("%w: the set's columns %v are not the spec's inputs %v", ErrColumns, set.Features, names)
	}
	if len(names) != c {
		return nil, nil, fmt.Errorf("%w: %d column names for %d columns", ErrColumns, len(names), c)
	}
	inputs := make([]Input, c)
	var numCols []int
	col := make([]float64, r)
	for j := range c {
		var t spec.Input
		if s.Types != nil {
			t = s.Types[j]
		}
		in := Input{Name: names[j], Type: t.Type, Missing: t.Missing, Unknown: t.Unknown, Fill: math.NaN(), Scale: 1}
		mat.Col(col, j, set.X)
		var texts []string
		if set.Texts != nil {
			texts = set.Texts[j]
		}
		if err := checkRead(in.Name, t.Type, texts); err != nil {
			return nil, nil, err
		}
		if t.Type == spec.CategoryInput {
			if err := fitCategory(&in, t, col, texts); err != nil {
				return nil, nil, describe(ErrFit, "input %q: %v", in.Name, err)
			}
		} else {
			if err := fitNumber(&in, t, col); err != nil {
				return nil, nil, describe(ErrFit, "input %q: %v", in.Name, err)
			}
			numCols = append(numCols, j)
		}
		inputs[j] = in
	}
	if len(numCols) > 0 && !opt.NoScale {
		filled := mat.NewDense(r, len(numCols), nil)
		numNames := make([]string, len(numCols))
		for k, j := range numCols {
			in := &inputs[j]
			numNames[k] = in.Name
			for i := range r {
				v := set.X.At(i, j)
				if v != v {
					v = in.Fill
				}
				filled.Set(i, k, v)
			}
		}
		mean, scale, warn := fitScale(filled, numNames)
		warnings = warn
		for k, j := range numCols {
			inputs[j].Mean, inputs[j].Scale = mean[k], scale[k]
		}
	}
	e, err = New(inputs, s.MissingTokens) // nil: New takes spec.DefaultMissingTokens
	if err != nil {
		return nil, nil, err
	}
	return e, warnings, nil
}

// fitNumber sets in.Fill from the column's values (NaN = missing).
func fitNumber(in *Input, t spec.Input, col []float64) error {
	vals := make([]float64, 0, len(col))
	for _, v := range col {
		if v == v {
			vals = append(vals, v)
		}
	}
	if len(vals) == 0 {
		return fmt.Errorf("every training value is missing; a number needs at least one value")
	}
	switch t.Missing {
	case spec.MissingRefuse:
		if len(vals) < len(col) {
			return describe(ErrMissingValue, "a value is missing in the training rows and the input's missing rule is refuse")
		}
	case spec.MissingMean:
		in.Fill = mean(vals)
	case spec.MissingMedian:
		in.Fill = median(vals)
	case spec.MissingMode:
		in.Fill = mode(vals)
	case spec.MissingConstant:
		in.Fill = t.Fill
	default:
		return fmt.Errorf("missing rule %v does not apply to a number", t.Missing)
	}
	return nil
}

func mean(v []float64) float64 {
	s := 0.0
	for _, a := range v {
		s += a
	}
	n := float64(len(v))
	if m := s / n; finite(m) {
		return m
	}
	s = 0 // the sum overflowed: add the terms divided by n
	for _, a := range v {
		s += a / n
	}
	return s
}

// median returns the middle value of v, or the mean of the two middle
// values for an even count (common practice). It sorts v.
func median(v []float64) float64 {
	slices.Sort(v)
	n := len(v)
	if n%2 == 1 {
		return v[n/2]
	}
	a, b := v[n/2-1], v[n/2]
	if m := (a + b) / 2; finite(m) {
		return m
	}
	return a/2 + b/2
}

// mode returns the most frequent value of v, the smallest on ties. It
// sorts v.
func mode(v []float64) float64 {
	slices.Sort(v)
	best, bestN := v[0], 0
	for i := 0; i < len(v); {
		j := i
		for j < len(v) && v[j] == v[i] {
			j++
		}
		if j-i > bestN {
			best, bestN = v[i], j-i
		}
		i = j
	}
	return best
}

// fitCategory sets in.Levels (declared or learned) and, under MissingMode,
// in.Fill from the column's text indices (NaN = missing).
func fitCategory(in *Input, t spec.Input, col []float64, texts []string) error {
	count := make([]int, len(texts))
	missing := 0
	for _, v := range col {
		if v != v {
			missing++
			continue
		}
		count[int(v)]++
	}
	if t.Missing == spec.MissingRefuse && missing > 0 {
		return describe(ErrMissingValue, "a value is missing in the training rows and the input's missing rule is refuse")
	}
	if t.Levels != nil {
		in.Levels = slices.Clone(t.Levels)
	} else {
		for k, n := range count {
			if n > 0 {
				in.Levels = append(in.Levels, texts[k])
			}
		}
		if len(in.Levels) > MaxLevels {
			return fmt.Errorf("%d distinct values in the training rows, more than %d (an identifier column?)", len(in.Levels), MaxLevels)
		}
		sortLevels(in.Levels)
		if len(in.Levels) < 2 {
			seen := "none"
			if len(in.Levels) == 1 {
				seen = strconv.Quote(in.Levels[0])
			}
			return describe(ErrLevels, "the training rows hold one level only (%s); a category needs at least two levels to carry information", seen)
		}
	}
	if t.Missing == spec.MissingMode {
		byText := make(map[string]int, len(texts))
		for k, tx := range texts {
			byText[tx] = count[k]
		}
		best, bestN := -1, 0
		for k, l := range in.Levels {
			if n := byText[l]; n > bestN {
				best, bestN = k, n
			}
		}
		if best < 0 {
			return fmt.Errorf("no training row holds one of the levels; the mode is undefined")
		}
		in.Fill = float64(best)
	}
	return nil
}

// sortLevels puts levels in the order an encoder learns them: numerically
// when every level is an integer (ties by text), else by byte order.
func sortLevels(levels []string) {
	nums := make(map[string]int64, len(levels))
	for _, l := range levels {
		v, err := strconv.ParseInt(l, 10, 64)
		if err != nil {
			nums = nil
			break
		}
		nums[l] = v
	}
	slices.SortFunc(levels, func(a, b string) int {
		if nums != nil && nums[a] != nums[b] {
			if nums[a] < nums[b] {
				return -1
			}
			return 1
		}
		return strings.Compare(a, b)
	})
}

// Resolve returns a copy of s whose category inputs hold e's levels and
// whose missing tokens are e's: the spec of the net that e feeds, whose
// Width is e.Width(). A spec whose inputs are a count is returned as a
// copy.
func (e *Encoder) Resolve(s *spec.Network) *spec.Network {
	c := s.Clone()
	if c.Types != nil && len(c.Types) == len(e.inputs) {
		for i := range c.Types {
			if e.inputs[i].Type == spec.CategoryInput {
				c.Types[i].Levels = slices.Clone(e.inputs[i].Levels)
			}
		}
	}
	if c.Features != nil {
		c.MissingTokens = slices.Clone(e.tokens)
	}
	return c
}

// CheckSpec reports whether e is the encoder of the resolved spec s: the
// same inputs in order (names when s lists them), types, levels, rules and
// constants, and missing tokens.
func (e *Encoder) CheckSpec(s *spec.Network) error {
	if s.Inputs != len(e.inputs) {
		return fmt.Errorf("%w: the encoder has %d inputs, the spec %d", ErrEncoder, len(e.inputs), s.Inputs)
	}
	if s.Features == nil {
		for i := range e.inputs {
			in := &e.inputs[i]
			if in.Type != spec.NumberInput || in.Missing != spec.MissingRefuse {
				return fmt.Errorf("%w: input %q is not a plain number, but the spec's inputs are a count", ErrEncoder, in.Name)
			}
		}
		return nil
	}
	if !slices.Equal(e.tokens, s.MissingTokens) && !(s.MissingTokens == nil && slices.Equal(e.tokens, spec.DefaultMissingTokens)) {
		return fmt.Errorf("%w: missing tokens %q, the spec's are %q", ErrEncoder, e.tokens, s.MissingTokens)
	}
	for i := range e.inputs {
		in := &e.inputs[i]
		var t spec.Input
		if s.Types != nil {
			t = s.Types[i]
		}
		switch {
		case in.Name != s.Features[i]:
			return fmt.Errorf("%w: input %d is %q in the encoder, %q in the spec", ErrEncoder, i+1, in.Name, s.Features[i])
		case in.Type != t.Type:
			return fmt.Errorf("%w: input %q is a %v in the encoder, a %v in the spec", ErrEncoder, in.Name, in.Type, t.Type)
		case in.Type == spec.CategoryInput && !slices.Equal(in.Levels, t.Levels):
			return fmt.Errorf("%w: input %q has levels %q in the encoder, %q in the spec", ErrEncoder, in.Name, in.Levels, t.Levels)
		case in.Missing != t.Missing || in.Unknown != t.Unknown:
			return fmt.Errorf("%w: input %q has rules missing=%v unknown=%v in the encoder, missing=%v unknown=%v in the spec", ErrEncoder, in.Name, in.Missing, in.Unknown, t.Missing, t.Unknown)
		case in.Missing == spec.MissingConstant && in.Fill != t.Fill:
			return fmt.Errorf("%w: input %q fills %v in the encoder, the spec's constant is %v", ErrEncoder, in.Name, in.Fill, t.Fill)
		}
	}
	return nil
}

// EncodeSet codes and expands every row of set, read with e.Columns(), into
// a new rows × Width matrix. Every problem (a missing value under refuse,
// an unknown level under refuse) is reported with the row's line in the
// file and the input's name: one as a *data.Error, several as a
// *data.ErrorList that lists the first data.MaxListed and counts the rest.
// Rows are coded one at a time, so no coded copy of the set is made.
func (e *Encoder) EncodeSet(set *data.Set) (*mat.Dense, error) {
	r, err := e.checkSet(set)
	if err != nil {
		return nil, err
	}
	out := mat.NewDense(r, e.width, nil)
	var errs errorList
	err = e.codeRows(set, &errs, func(i int, coded []float64) {
		u := e.Expand(out.RawRowView(i), coded)
		for j := range e.inputs {
			in := &e.inputs[j]
			if in.Type == spec.NumberInput && math.IsInf(u[in.Offset], 0) {
				errs.add(set, i, in.Name, describe(ErrNotFinite, "%v scales to %v: the value is too far from the training rows' (mean %.6g, scale %.6g) to be represented", coded[j], u[in.Offset], in.Mean, in.Scale))
			}
		}
	})
	if err != nil {
		return nil, err
	}
	if err := errs.err(); err != nil {
		return nil, err
	}
	return out, nil
}

// CodeSet codes every row of set, read with e.Columns(), into a new
// rows × NumInputs matrix of coded rows (see Encoder): the rows that a
// model's float64 prediction methods take. Problems are reported as by
// EncodeSet.
func (e *Encoder) CodeSet(set *data.Set) (*mat.Dense, error) {
	r, err := e.checkSet(set)
	if err != nil {
		return nil, err
	}
	out := mat.NewDense(r, len(e.inputs), nil)
	var errs errorList
	if err := e.codeRows(set, &errs, func(i int, coded []float64) { copy(out.RawRowView(i), coded) }); err != nil {
		return nil, err
	}
	if err := errs.err(); err != nil {
		return nil, err
	}
	return out, nil
}

// checkSet reports a set whose columns are not e's, and returns its rows.
func (e *Encoder) checkSet(set *data.Set) (int, error) {
	if set == nil || set.Rows() == 0 {
		return 0, fmt.Errorf("%w: no rows", ErrNoSet)
	}
	r, c := set.X.Dims()
	if c != len(e.inputs) {
		return 0, fmt.Errorf("%w: the set has %d input columns, the model %d inputs", ErrColumns, c, len(e.inputs))
	}
	if set.Features != nil && !slices.Equal(set.Features, e.Names()) {
		return 0, fmt.Errorf("%w: the set's columns %q are not the model's inputs %q", ErrColumns, set.Features, e.Names())
	}
	return r, nil
}

// checkRead reports a column read as text (texts != nil, see
// data.Set.Texts) for a number input, or as numbers for a category.
func checkRead(name string, t spec.InputType, texts []string) error {
	if (t == spec.CategoryInput) == (texts != nil) {
		return nil
	}
	read := "numbers"
	if texts != nil {
		read = "text"
	}
	return fmt.Errorf("%w: input %q is a %v but its column was read as %s", ErrColumns, name, t, read)
}

// codeRows codes each row of set in turn and hands it to emit (the slice
// is reused); problems go to errs, and a row with one is not emitted.
func (e *Encoder) codeRows(set *data.Set, errs *errorList, emit func(i int, coded []float64)) error {
	r, c := set.X.Dims()
	// For each category, the code of each of the file's texts: a level
	// index, −1 for an unknown level under ignore, −2 under refuse.
	trans := make([][]float64, c)
	for j := range e.inputs {
		in := &e.inputs[j]
		var texts []string
		if set.Texts != nil {
			texts = set.Texts[j]
		}
		if err := checkRead(in.Name, in.Type, texts); err != nil {
			return err
		}
		if texts == nil {
			continue
		}
		trans[j] = make([]float64, len(texts))
		for k, t := range texts {
			code, ok := e.levels[j][t]
			switch {
			case ok:
				trans[j][k] = float64(code)
			case in.Unknown == spec.UnknownIgnore:
				trans[j][k] = -1
			default:
				trans[j][k] = -2
			}
		}
	}
	row := make([]float64, c)
	for i := range r {
		ok := true
		for j, v := range set.X.RawRowView(i) {
			var err error
			switch {
			case v != v:
				v, err = e.codeMissing(j)
			case trans[j] != nil:
				t := set.Texts[j][int(v)]
				if v = trans[j][int(v)]; v == -2 {
					_, err = e.codeText(j, t)
				}
			}
			if err != nil {
				errs.add(set, i, e.inputs[j].Name, err)
				ok = false
			}
			row[j] = v
		}
		if ok {
			emit(i, row)
		}
	}
	return nil
}

// Placeholder returns s when every category input has its levels, and
// otherwise a copy of s in which each category without levels has two
// stand-in levels: a net of the right depth and nearly the right width, to
// check or describe a spec before any data is seen. Never train it.
func Placeholder(s *spec.Network) *spec.Network {
	if s.Resolved() || s.Types == nil {
		return s
	}
	c := s.Clone()
	for i := range c.Types {
		if c.Types[i].Units() == 0 {
			c.Types[i].Levels = []string{"\x00level-1", "\x00level-2"}
		}
	}
	return c
}
