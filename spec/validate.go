package spec

import (
	"fmt"
	"maps"
	"math"
	"slices"
	"strconv"
	"strings"
)

// Default limits, used where a Limits field is zero.
const (
	DefaultMaxBytes   = 1 << 20    // largest spec file read, in bytes (1 MiB)
	DefaultMaxParams  = 50_000_000 // largest param count of a network
	DefaultMaxClasses = 1 << 16    // most output classes
	DefaultMaxLevels  = 1 << 16    // most declared levels of one category input
)

// Limits bounds what Parse accepts. A zero or negative field means its
// default.
type Limits struct {
	MaxBytes   int64 // bytes read from the spec; default DefaultMaxBytes
	MaxParams  int   // params of the network, Σ_l (n_{l−1}+1)·n_l; default DefaultMaxParams
	MaxClasses int   // output classes, also bounds `units:` before names are made; default DefaultMaxClasses
	MaxLevels  int   // declared levels of each category input, checked before they are copied; default DefaultMaxLevels
}

func (l Limits) withDefaults() Limits {
	if l.MaxBytes <= 0 {
		l.MaxBytes = DefaultMaxBytes
	}
	if l.MaxParams <= 0 {
		l.MaxParams = DefaultMaxParams
	}
	if l.MaxClasses <= 0 {
		l.MaxClasses = DefaultMaxClasses
	}
	if l.MaxLevels <= 0 {
		l.MaxLevels = DefaultMaxLevels
	}
	return l
}

const (
	hiddenNames = "sigmoid, tanh, relu, leaky-relu, softplus, identity"
	outputNames = "softmax, sigmoid"
	schemeList  = "glorot-uniform, he-uniform, uniform"
	optimList   = "gd, cg, lbfgs, momentum, adam"

	inputTypeList = "number, category"
	unknownList   = "refuse, ignore"
	missingList   = "refuse, mean, median, mode or a number for a number input; refuse, level or mode for a category"
	numberMissing = "refuse, mean, median, mode or a constant"
	catMissing    = "refuse, level or mode"
)

// Validate checks n with the default Limits and returns nil, an *Error or
// an ErrorList. Positions are 0; Field names the offending value as a key
// path of the YAML format. It checks the param count with overflow-safe
// arithmetic before anything else may call ParamCount.
//
// Unlike Parse, Validate applies no defaults: a zero Output.Activation,
// Hidden[i].Activation or Init.Scheme is reported as missing.
func (n *Network) Validate() error { return n.ValidateLimits(Limits{}) }

// ValidateLimits is Validate with the given limits (MaxBytes is unused).
func (n *Network) ValidateLimits(lim Limits) error {
	return asError(n.check(lim.withDefaults()))
}

// check returns every semantic problem of n with Field set to a canonical
// key path and no position. lim must have its defaults applied.
func (n *Network) check(lim Limits) []*Error {
	var errs []*Error
	add := func(field string, kind error, format string, args ...any) {
		errs = append(errs, &Error{Field: field, Err: newDetail(kind, format, args...)})
	}
	finite := func(field string, v float64) bool {
		switch {
		case math.IsNaN(v) || math.IsInf(v, 0):
			add(field, ErrRange, "want a finite number, got %v", v)
		case v < 0:
			add(field, ErrRange, "want a number ≥ 0, got %v", v)
		default:
			return true
		}
		return false
	}
	// size reports whether a layer width is usable for the param count.
	size := func(field, what string, v int) bool {
		switch {
		case v < 1:
			add(field, ErrRange, "want at least 1 %s, got %d", what, v)
		case v > lim.MaxParams:
			add(field, ErrTooLarge, "%d %s exceed the param limit %d", v, what, lim.MaxParams)
		default:
			return true
		}
		return false
	}

	if n.Version != 1 {
		add("version", ErrVersion, "unsupported version %d (this package reads version 1)", n.Version)
	}

	sizesOK := size("inputs", "inputs", n.Inputs)
	if n.Features != nil {
		if len(n.Features) != n.Inputs {
			add("inputs", ErrRange, "%d feature names for %d inputs", len(n.Features), n.Inputs)
		}
		names(&errs, n.Features, "inputs", "feature")
	}
	switch {
	case n.Types == nil:
	case n.Features == nil:
		add("inputs", ErrConflict, "input types need input names (Types is set, Features is nil)")
		sizesOK = false
	case len(n.Types) != n.Inputs:
		add("inputs", ErrRange, "%d input types for %d inputs", len(n.Types), n.Inputs)
		sizesOK = false
	}
	errs = append(errs, n.checkTokens()...)
	if n.Types != nil {
		tokens := make(map[string]bool)
		for _, t := range n.missingTokensOrDefault() {
			tokens[t] = true
		}
		for i, in := range n.Types {
			errs = append(errs, in.check("inputs["+strconv.Itoa(i)+"]", tokens, lim)...)
		}
		if sizesOK {
			// Each width is at most MaxLevels+1 and there are at most
			// MaxParams of them, so the sum cannot overflow.
			if w := n.Sizes()[0]; w > lim.MaxParams {
				add("inputs", ErrTooLarge, "%d input units exceed the param limit %d", w, lim.MaxParams)
				sizesOK = false
			}
		}
	}

	for i, h := range n.Hidden {
		p := "hidden[" + strconv.Itoa(i) + "]"
		if !size(p+".units", "units", h.Units) {
			sizesOK = false
		}
		switch {
		case h.Activation == 0:
			add(p+".activation", ErrMissingField, "missing activation (want one of %s)", hiddenNames)
		case h.Activation == Softmax:
			add(p+".activation", ErrRange, "softmax is only for the output layer (want one of %s)", hiddenNames)
		case h.Activation < 0 || h.Activation > Softmax:
			add(p+".activation", ErrRange, "unknown activation %v (want one of %s)", h.Activation, hiddenNames)
		}
	}

	o := n.Output
	switch o.Activation {
	case Softmax, Sigmoid:
	case 0:
		add("output.activation", ErrMissingField, "missing activation (want one of %s)", outputNames)
	default:
		add("output.activation", ErrRange, "%v is not an output activation (want one of %s)", o.Activation, outputNames)
	}
	if o.Multilabel && o.Activation == Softmax {
		add("output.multilabel", ErrConflict, "multilabel needs a sigmoid output (softmax gives exactly one class per row)")
	}
	k := len(o.Classes)
	min := 2
	if o.Activation == Sigmoid && o.Multilabel {
		min = 1
	}
	switch {
	case k > lim.MaxClasses:
		add("output.classes", ErrTooLarge, "%d classes exceed the limit %d", k, lim.MaxClasses)
		sizesOK = false
	case k < min:
		add("output.classes", ErrRange, "want at least %d %s for a %s output, got %d",
			min, plural(min, "class", "classes"), outputKind(o), k)
		if k < 1 {
			sizesOK = false
		}
	}
	names(&errs, o.Classes, "output.classes", "class")

	finite("penalty.l2", n.Penalty.L2)
	finite("penalty.l1", n.Penalty.L1)

	switch s := n.Init.Scheme; {
	case s == 0:
		add("init.scheme", ErrMissingField, "missing scheme (want one of %s)", schemeList)
	case s < 0 || s > Uniform:
		add("init.scheme", ErrRange, "unknown scheme %v (want one of %s)", s, schemeList)
	}
	if finite("init.scale", n.Init.Scale) && n.Init.Scheme == Uniform && n.Init.Scale == 0 {
		add("init.scale", ErrRange, "scheme uniform needs a scale > 0 (the half-width of the interval)")
	}

	t := n.Train
	if t.Optimizer < 0 || t.Optimizer > Adam {
		add("train.optimizer", ErrRange, "unknown optimizer %v (want one of %s)", t.Optimizer, optimList)
	}
	if t.Iterations < 0 {
		add("train.iterations", ErrRange, "want iterations ≥ 0, got %d", t.Iterations)
	}
	if t.Batch < 0 {
		add("train.batch", ErrRange, "want batch ≥ 0 (0 = all rows), got %d", t.Batch)
	}
	finite("train.rate", t.Rate)
	finite("train.tolerance", t.Tolerance)
	errs = append(errs, t.ClassWeights.check(o.Classes)...)

	if sizesOK {
		if field, c, ok := paramCheck(n, lim.MaxParams); !ok {
			add(field, ErrTooLarge, "param count exceeds the limit %d (at least %d params up to this layer)", lim.MaxParams, c)
		}
	}
	return errs
}

// paramCheck adds up Σ_l (n_{l−1}+1)·n_l layer by layer without overflow.
// If the sum passes limit it returns the field of the first layer that
// makes it do so, the sum (capped at limit+1) and false. Every width must
// be in [1, limit].
func paramCheck(n *Network, limit int) (field string, count int, ok bool) {
	s := n.Sizes()
	c := 0
	for l := 1; l < len(s); l++ {
		in, out := s[l-1]+1, s[l] // in ≤ limit+1, out ≤ limit: no overflow below
		room := limit - c
		if out > room || in > room/out { // in·out > room, tested without forming in·out
			if l == len(s)-1 {
				return "output.classes", limit + 1, false
			}
			return "hidden[" + strconv.Itoa(l-1) + "].units", limit + 1, false
		}
		c += in * out
	}
	return "", c, true
}

// names reports empty and repeated entries of list, whose elements have
// the key paths path[i].
func names(errs *[]*Error, list []string, path, what string) {
	seen := make(map[string]int, len(list))
	for i, s := range list {
		field := path + "[" + strconv.Itoa(i) + "]"
		if strings.TrimSpace(s) == "" {
			*errs = append(*errs, &Error{Field: field, Err: newDetail(ErrRange, "empty %s name", what)})
			continue
		}
		if j, dup := seen[s]; dup {
			*errs = append(*errs, &Error{Field: field, Err: newDetail(ErrDuplicate,
				"duplicate %s name %q (also %s[%d])", what, s, path, j)})
			continue
		}
		seen[s] = i
	}
}

func outputKind(o Output) string {
	switch {
	case o.Activation == Sigmoid && o.Multilabel:
		return "multilabel sigmoid"
	case o.Activation == Sigmoid:
		return "sigmoid"
	case o.Activation == Softmax:
		return "softmax"
	}
	return fmt.Sprint(o.Activation)
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// checkTokens reports missing tokens with surrounding spaces (cells are
// trimmed before they are compared, so such a token never matches) and
// repeated ones.
func (n *Network) checkTokens() []*Error {
	var errs []*Error
	seen := make(map[string]int, len(n.MissingTokens))
	for i, t := range n.MissingTokens {
		field := "missing_tokens[" + strconv.Itoa(i) + "]"
		if strings.TrimSpace(t) != t {
			errs = append(errs, &Error{Field: field, Err: newDetail(ErrRange,
				"missing token %q has surrounding spaces (cells are trimmed before they are compared)", truncate(t))})
			continue
		}
		if j, dup := seen[t]; dup {
			errs = append(errs, &Error{Field: field, Err: newDetail(ErrDuplicate,
				"duplicate missing token %q (also missing_tokens[%d])", truncate(t), j)})
			continue
		}
		seen[t] = i
	}
	return errs
}

// check returns the problems of one input at key path path: values out of
// range, declared levels (count, names, collisions with the missing
// tokens) and rules that do not fit the input's type (ErrConflict).
func (in Input) check(path string, tokens map[string]bool, lim Limits) []*Error {
	var errs []*Error
	add := func(field string, kind error, format string, args ...any) {
		errs = append(errs, &Error{Field: path + field, Err: newDetail(kind, format, args...)})
	}
	typed := true
	if in.Type != NumberInput && in.Type != CategoryInput {
		add(".type", ErrRange, "unknown input type %v (want one of %s)", in.Type, inputTypeList)
		typed = false
	}
	cat := in.Type == CategoryInput

	if in.Levels != nil {
		k := len(in.Levels)
		switch {
		case typed && !cat:
			add(".levels", ErrConflict, "levels are for a category input (add type: category)")
		case k > lim.MaxLevels:
			add(".levels", ErrTooLarge, "%d levels exceed the limit %d", k, lim.MaxLevels)
		case k < 2:
			add(".levels", ErrRange, "a category needs at least 2 levels, got %d (one level carries no information)", k)
		}
		if k <= lim.MaxLevels {
			seen := make(map[string]int, k)
			for j, l := range in.Levels {
				field := ".levels[" + strconv.Itoa(j) + "]"
				switch {
				case strings.TrimSpace(l) == "":
					add(field, ErrRange, "empty level name")
				case strings.TrimSpace(l) != l:
					add(field, ErrRange, "level %q has surrounding spaces (cells are trimmed before they are compared)", truncate(l))
				case tokens[l]:
					add(field, ErrConflict, "level %q is also a missing token (rename the level, or set missing_tokens without it)", truncate(l))
				default:
					if i, dup := seen[l]; dup {
						add(field, ErrDuplicate, "duplicate level %q (also %s.levels[%d])", truncate(l), path, i)
					} else {
						seen[l] = j
					}
				}
			}
		}
	}

	switch r := in.Missing; {
	case r < MissingRefuse || r > MissingLevel:
		add(".missing", ErrRange, "unknown missing rule %v (want one of %s)", r, missingList)
	case !typed:
	case cat && r == MissingConstant:
		add(".missing", ErrConflict, "a constant fill (%v) is for a number input (a category takes %s)", in.Fill, catMissing)
	case cat && (r == MissingMean || r == MissingMedian):
		add(".missing", ErrConflict, "missing: %v is for a number input (a category takes %s)", r, catMissing)
	case !cat && r == MissingLevel:
		add(".missing", ErrConflict, "missing: level is for a category input (a number takes %s)", numberMissing)
	}
	switch {
	case math.IsNaN(in.Fill) || math.IsInf(in.Fill, 0):
		add(".missing", ErrRange, "want a finite fill value, got %v", in.Fill)
	case in.Fill != 0 && in.Missing != MissingConstant:
		add(".missing", ErrConflict, "fill value %v without the constant rule (Missing is %v)", in.Fill, in.Missing)
	}

	switch {
	case in.Unknown != UnknownRefuse && in.Unknown != UnknownIgnore:
		add(".unknown", ErrRange, "unknown rule %v for unseen levels (want one of %s)", in.Unknown, unknownList)
	case typed && !cat && in.Unknown != UnknownRefuse:
		add(".unknown", ErrConflict, "unknown is for a category input (a number has no levels)")
	}
	return errs
}

// check returns the problems of the class weights for an output with the
// given classes, in a fixed order (by class name).
func (c ClassWeights) check(classes []string) []*Error {
	var errs []*Error
	if c.Balanced && len(c.By) > 0 {
		errs = append(errs, &Error{Field: "train.class_weights", Err: newDetail(ErrConflict,
			"give balanced or weights by class, not both")})
	}
	known := make(map[string]bool, len(classes))
	for _, k := range classes {
		known[k] = true
	}
	for _, name := range slices.Sorted(maps.Keys(c.By)) {
		field := weightField(name)
		if !known[name] {
			errs = append(errs, &Error{Field: field, Err: newDetail(ErrUnknownName,
				"unknown class %q (want one of the output classes: %s)", truncate(name), listSome(classes, 10))})
		}
		switch w := c.By[name]; {
		case math.IsNaN(w) || math.IsInf(w, 0):
			errs = append(errs, &Error{Field: field, Err: newDetail(ErrRange, "want a finite weight > 0, got %v", w)})
		case w <= 0:
			errs = append(errs, &Error{Field: field, Err: newDetail(ErrRange, "want a weight > 0, got %v", w)})
		}
	}
	return errs
}

// weightField is the key path of the class weight of class name:
// train.class_weights.NAME, or train.class_weights["NAME"] when the name
// is not a plain word (letters, digits, '-' and '_').
func weightField(name string) string {
	plainWord := name != ""
	for _, r := range name {
		if !(r == '-' || r == '_' || r >= '0' && r <= '9' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z') {
			plainWord = false
			break
		}
	}
	if plainWord {
		return "train.class_weights." + name
	}
	return "train.class_weights[" + strconv.Quote(truncate(name)) + "]"
}

// listSome joins the first max entries of list, and says how many more
// there are.
func listSome(list []string, max int) string {
	if len(list) <= max {
		return strings.Join(list, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(list[:max], ", "), len(list)-max)
}
