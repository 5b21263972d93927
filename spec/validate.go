package spec

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Default limits, used where a Limits field is zero.
const (
	DefaultMaxBytes   = 1 << 20    // largest spec file read, in bytes (1 MiB)
	DefaultMaxParams  = 50_000_000 // largest param count of a network
	DefaultMaxClasses = 1 << 16    // most output classes
)

// Limits bounds what Parse accepts. A zero or negative field means its
// default.
type Limits struct {
	MaxBytes   int64 // bytes read from the spec; default DefaultMaxBytes
	MaxParams  int   // params of the network, Σ_l (n_{l−1}+1)·n_l; default DefaultMaxParams
	MaxClasses int   // output classes, also bounds `units:` before names are made; default DefaultMaxClasses
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
	return l
}

const (
	hiddenNames = "sigmoid, tanh, relu, leaky-relu, softplus, identity"
	outputNames = "softmax, sigmoid"
	schemeList  = "glorot-uniform, he-uniform, uniform"
	optimList   = "gd, cg, lbfgs, momentum, adam"
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
