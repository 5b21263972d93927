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

// ParseActivation returns the activation with the given spec name.
func ParseActivation(name string) (Activation, bool) {
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

// ParseScheme returns the scheme with the given spec name.
func ParseScheme(name string) (Scheme, bool) {
	for i, n := range schemeNames {
		if i > 0 && n == name {
			return Scheme(i), true
		}
	}
	return 0, false
}

// Network is a checked description of one network. Parse returns it with
// every field resolved: activations and scheme are never zero, Classes is
// never empty. Train fields may be zero, meaning "not set".
type Network struct {
	Version  int      // format version; 1
	Name     string   // free text; may be empty
	Inputs   int      // number of input features, ≥ 1
	Features []string // input feature names when the spec lists them (len = Inputs), else nil
	Hidden   []Layer  // hidden layers, input side first; nil when there are none (Parse never returns an empty non-nil slice)
	Output   Output
	Penalty  Penalty
	Init     Init
	Train    Train
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
}

// Sizes returns the layer widths from input to output:
// Inputs, Hidden[0].Units, …, Output.Units().
func (n *Network) Sizes() []int {
	s := make([]int, 0, len(n.Hidden)+2)
	s = append(s, n.Inputs)
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
