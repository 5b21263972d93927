package spec

import "fmt"

// Activation names a unit's nonlinearity. The zero value is not a valid
// activation; Parse always resolves it.
type Activation int

const (
	Sigmoid   Activation = iota + 1 // σ(z) = 1/(1+e^(−z)); hidden or output
	Tanh                            // tanh(z); hidden
	ReLU                            // max(0, z); hidden
	LeakyReLU                       // z if z > 0 else 0.01·z; hidden
	Softplus                        // ln(1+e^z); hidden
	Identity                        // z; hidden
	Softmax                         // e^(z_k)/Σ_j e^(z_j); output only
)

var activationNames = [...]string{
	Sigmoid:   "sigmoid",
	Tanh:      "tanh",
	ReLU:      "relu",
	LeakyReLU: "leaky-relu",
	Softplus:  "softplus",
	Identity:  "identity",
	Softmax:   "softmax",
}

// String returns the spec name of a, e.g. "leaky-relu".
func (a Activation) String() string {
	if a > 0 && int(a) < len(activationNames) {
		return activationNames[a]
	}
	return fmt.Sprintf("Activation(%d)", int(a))
}

// parseActivation returns the activation with the given spec name.
func parseActivation(name string) (Activation, bool) {
	for i, n := range activationNames {
		if i > 0 && n == name {
			return Activation(i), true
		}
	}
	return 0, false
}

// Optimizer names a training method. The zero value means "not set": the
// caller's default applies.
type Optimizer int

const (
	GD       Optimizer = iota + 1 // gradient descent
	CG                            // nonlinear conjugate gradient
	LBFGS                         // limited-memory BFGS
	Momentum                      // mini-batch momentum
	Adam                          // mini-batch Adam
)

var optimizerNames = [...]string{GD: "gd", CG: "cg", LBFGS: "lbfgs", Momentum: "momentum", Adam: "adam"}

// String returns the spec name of o, e.g. "lbfgs".
func (o Optimizer) String() string {
	if o > 0 && int(o) < len(optimizerNames) {
		return optimizerNames[o]
	}
	return fmt.Sprintf("Optimizer(%d)", int(o))
}

// ParseOptimizer returns the optimizer with the given spec name.
func ParseOptimizer(name string) (Optimizer, bool) {
	for i, n := range optimizerNames {
		if i > 0 && n == name {
			return Optimizer(i), true
		}
	}
	return 0, false
}

// Scheme names a weight initialisation scheme.
type Scheme int

const (
	GlorotUniform Scheme = iota + 1 // U(−r, r), r = √(6/(fan_in+fan_out)) (Glorot & Bengio 2010)
	HeUniform                       // U(−r, r), r = √(6/fan_in) (He et al. 2015)
	Uniform                         // U(−scale, scale)
)

var schemeNames = [...]string{GlorotUniform: "glorot-uniform", HeUniform: "he-uniform", Uniform: "uniform"}

// String returns the spec name of s, e.g. "glorot-uniform".
func (s Scheme) String() string {
	if s > 0 && int(s) < len(schemeNames) {
		return schemeNames[s]
	}
	return fmt.Sprintf("Scheme(%d)", int(s))
}

// parseScheme returns the scheme with the given spec name.
func parseScheme(name string) (Scheme, bool) {
	for i, n := range schemeNames {
		if i > 0 && n == name {
			return Scheme(i), true
		}
	}
	return 0, false
}

// InputType is the type of one raw input. The zero value is NumberInput.
type InputType int

const (
	NumberInput   InputType = iota // a real number: one input unit, imputed then standardised
	CategoryInput                  // one of a set of levels (text): one unit per level, one-hot
)

var inputTypeNames = [...]string{NumberInput: "number", CategoryInput: "category"}

// String returns the spec name of t: "number" or "category".
func (t InputType) String() string {
	if t >= 0 && int(t) < len(inputTypeNames) {
		return inputTypeNames[t]
	}
	return fmt.Sprintf("InputType(%d)", int(t))
}

// parseInputType returns the input type with the given spec name.
func parseInputType(name string) (InputType, bool) {
	for i, n := range inputTypeNames {
		if n == name {
			return InputType(i), true
		}
	}
	return 0, false
}

// MissingRule says what fills a missing cell of an input. The zero value,
// MissingRefuse, makes a missing cell an error.
type MissingRule int

const (
	MissingRefuse   MissingRule = iota // a missing cell is an error (the default)
	MissingMean                        // number: the mean of the training rows' values
	MissingMedian                      // number: the median of the training rows' values
	MissingMode                        // number or category: the most frequent training value (on ties the smallest number, or the first level in level order)
	MissingConstant                    // number: Input.Fill
	MissingLevel                       // category: a unit of its own, after the levels' units
)

var missingNames = [...]string{MissingRefuse: "refuse", MissingMean: "mean", MissingMedian: "median", MissingMode: "mode", MissingConstant: "constant", MissingLevel: "level"}

// String returns the spec word of r, e.g. "median"; MissingConstant gives
// "constant" (the spec writes the constant itself).
func (r MissingRule) String() string {
	if r >= 0 && int(r) < len(missingNames) {
		return missingNames[r]
	}
	return fmt.Sprintf("MissingRule(%d)", int(r))
}

// parseMissingRule returns the missing rule with the given spec word:
// refuse, mean, median, mode or level. "constant" is not a spec word (the
// spec writes the constant itself), so it is not accepted.
func parseMissingRule(word string) (MissingRule, bool) {
	for i, n := range missingNames {
		if n == word && MissingRule(i) != MissingConstant {
			return MissingRule(i), true
		}
	}
	return 0, false
}

// UnknownRule says what a category level never seen in training does at
// prediction. The zero value, UnknownRefuse, makes it an error.
type UnknownRule int

const (
	UnknownRefuse UnknownRule = iota // an unknown level is an error (the default)
	UnknownIgnore                    // an unknown level sets all the input's units to 0
)

var unknownNames = [...]string{UnknownRefuse: "refuse", UnknownIgnore: "ignore"}

// String returns the spec word of r: "refuse" or "ignore".
func (r UnknownRule) String() string {
	if r >= 0 && int(r) < len(unknownNames) {
		return unknownNames[r]
	}
	return fmt.Sprintf("UnknownRule(%d)", int(r))
}

// parseUnknownRule returns the unknown rule with the given spec word.
func parseUnknownRule(word string) (UnknownRule, bool) {
	for i, n := range unknownNames {
		if n == word {
			return UnknownRule(i), true
		}
	}
	return 0, false
}

// Input is the type and rules of one raw input. Its zero value is a number
// input that refuses missing cells, which is what a bare name in `inputs`
// means.
type Input struct {
	Type InputType
	// Levels are a category's levels in unit order: declared in the spec,
	// or learned from the training rows (then nil in the spec as written,
	// and filled in the spec a model stores). nil for a number.
	Levels  []string
	Missing MissingRule
	Fill    float64     // the constant of MissingConstant; 0 otherwise
	Unknown UnknownRule // category only
}

// IsZero reports whether in is the zero Input: a number that refuses
// missing cells, written in a spec as a bare name.
func (in Input) IsZero() bool {
	return in.Type == NumberInput && in.Levels == nil && in.Missing == MissingRefuse &&
		in.Fill == 0 && in.Unknown == UnknownRefuse
}

// Units returns the number of input units of in: 1 for a number, and for a
// category the number of levels, plus one with MissingLevel. A category
// whose levels are not known yet has 0 units.
func (in Input) Units() int {
	if in.Type != CategoryInput {
		return 1
	}
	if len(in.Levels) == 0 {
		return 0
	}
	if in.Missing == MissingLevel {
		return len(in.Levels) + 1
	}
	return len(in.Levels)
}

// DefaultMissingTokens are the cell texts that count as missing when a spec
// has no missing_tokens.
var DefaultMissingTokens = []string{"", "?", "NA"}

// Network is a checked description of one network. Parse returns it with
// every field resolved: activations and scheme are never zero, Classes is
// never empty. Train fields may be zero, meaning "not set".
type Network struct {
	Version  int      // format version; 1
	Name     string   // free text; may be empty
	Inputs   int      // number of raw inputs, ≥ 1 (a category input counts once)
	Features []string // raw input names when the spec lists them (len = Inputs), else nil
	// Types holds the type and rules of each raw input when the spec lists
	// names (len = Inputs); nil means every input is a plain number, as
	// with `inputs: N`. Parse sets it whenever Features is set.
	Types []Input
	// MissingTokens are the cell texts (after trimming spaces) that count
	// as missing; Parse sets DefaultMissingTokens when the spec has none.
	// nil (in a Network built in Go) also means DefaultMissingTokens; an
	// empty non-nil list means that no cell counts as missing.
	MissingTokens []string
	Hidden        []Layer // hidden layers, input side first; nil when there are none (Parse never returns an empty non-nil slice)
	Output        Output
	Penalty       Penalty
	Init          Init
	Train         Train
}

// Layer is one hidden layer.
type Layer struct {
	Units      int // ≥ 1
	Activation Activation
}

// Output is the output layer.
type Output struct {
	// Classes are the class names in output order. A spec written with
	// `units: K` gets the names "0" … "K-1".
	Classes    []string
	Activation Activation // Softmax or Sigmoid
	Multilabel bool       // Sigmoid only: a row may carry several classes
}

// Units returns the number of output units: 1 for a sigmoid output with two
// classes that is not multi-label (the unit gives the probability of
// Classes[1]), else len(Classes).
func (o Output) Units() int {
	if o.Activation == Sigmoid && !o.Multilabel && len(o.Classes) == 2 {
		return 1
	}
	return len(o.Classes)
}

// Penalty is the weight penalty added to the cost.
type Penalty struct {
	L2   float64 // λ ≥ 0: adds λ/(2m)·Σw²
	L1   float64 // λ₁ ≥ 0: adds λ₁/m·Σ|w|
	Bias bool    // also penalise bias weights
}

// Init is the initialisation of the params.
type Init struct {
	Scheme Scheme
	Scale  float64 // half-width for Uniform; > 0 there, ignored otherwise
	Seed   uint64  // seed of the random draw; Parse sets 1 when the spec has none
}

// Train holds optional training defaults; a zero field is "not set".
type Train struct {
	Optimizer  Optimizer
	Iterations int     // ≥ 0
	Batch      int     // mini-batch rows for momentum/adam; 0 = all rows
	Rate       float64 // learning rate for gd, momentum, adam; ≥ 0
	Tolerance  float64 // gradient-norm tolerance; ≥ 0
	// ClassWeights are per-class factors on the cross-entropy; the zero
	// value weighs every class 1.
	ClassWeights ClassWeights
}

// ClassWeights are per-class factors w_k on each row's cross-entropy term.
// With Balanced, w_k = m/(K·m_k) for m training rows, K classes and m_k
// rows of class k (for multi-label outputs, m_k counts the rows that carry
// class k, and the weight applies to the positive side of each class).
// Otherwise By maps class names to factors > 0; a class not named has 1.
type ClassWeights struct {
	Balanced bool
	By       map[string]float64
}

// Input returns the type and rules of raw input i: Types[i], or the zero
// Input (a plain number) when Types is nil. It panics if i is not in
// [0, Inputs).
func (n *Network) Input(i int) Input {
	if i < 0 || i >= n.Inputs {
		panic(fmt.Sprintf("spec: input %d of %d", i, n.Inputs))
	}
	if n.Types == nil {
		return Input{}
	}
	return n.Types[i]
}

// missingTokensOrDefault returns MissingTokens, or DefaultMissingTokens
// when it is nil. The caller must not modify the result.
func (n *Network) missingTokensOrDefault() []string {
	if n.MissingTokens == nil {
		return DefaultMissingTokens
	}
	return n.MissingTokens
}

// Set reports whether any class weight other than 1 is asked for.
func (c ClassWeights) Set() bool { return c.Balanced || len(c.By) > 0 }

// Width returns the number of input units of the net: Inputs when Types is
// nil, else the sum of Types[i].Units(). It is 0 when a category input has
// no levels yet (they are learned when the encoder is fitted).
func (n *Network) Width() int {
	if n.Types == nil {
		return n.Inputs
	}
	w := 0
	for _, t := range n.Types {
		u := t.Units()
		if u == 0 {
			return 0
		}
		w += u
	}
	return w
}

// Resolved reports whether every category input has its levels, so that
// Width and Sizes are the net's.
func (n *Network) Resolved() bool { return n.Width() > 0 }

// Sizes returns the layer widths from input to output:
// Width(), Hidden[0].Units, …, Output.Units(). For a spec that is not
// Resolved, an unresolved category counts as one unit (a lower bound).
func (n *Network) Sizes() []int {
	s := make([]int, 0, len(n.Hidden)+2)
	w := n.Width()
	if w == 0 {
		for _, t := range n.Types {
			w += max(t.Units(), 1)
		}
	}
	s = append(s, w)
	for _, h := range n.Hidden {
		s = append(s, h.Units)
	}
	return append(s, n.Output.Units())
}

// ParamCount returns the number of weights and biases of the network:
// Σ_l (n_{l−1}+1)·n_l over the layer widths n_l.
func (n *Network) ParamCount() int {
	s := n.Sizes()
	c := 0
	for l := 1; l < len(s); l++ {
		c += (s[l-1] + 1) * s[l]
	}
	return c
}
