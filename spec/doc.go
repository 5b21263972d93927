// Package spec reads, checks and writes the YAML description of one
// network (a spec): its inputs, hidden layers, output, weight penalty,
// initialisation and training defaults. It is the only package that reads
// YAML; the rest of the project sees a checked *Network with typed
// constants.
//
// # Format
//
// A spec is one YAML 1.2 document in UTF-8: a mapping with the keys below.
// Every key is optional unless marked required; a key with an empty (null)
// value counts as absent. Unknown keys, repeated keys, values of the wrong
// type and values out of range are errors. Integers may be written in any
// YAML integer form (12, 0x0c, 1_000) or as a whole number in float form
// (1e3) up to 2^53. Numbers must be finite (.nan and .inf are rejected).
//
//	version: 1               # required; integer; the only version is 1
//	name: request-triage     # text; default ""
//	inputs: 12               # required; integer ≥ 1, or a list of distinct,
//	                         # non-empty feature names (then CSV columns are
//	                         # picked by name and inputs = the list length)
//	hidden:                  # list of layers, input side first; default none
//	  - units: 32            # required; integer ≥ 1
//	    activation: tanh     # required; sigmoid | tanh | relu | leaky-relu |
//	                         # softplus | identity (softmax is output-only)
//	output:                  # required
//	  classes: [a, b, c]     # list of distinct, non-empty class names, or
//	  # units: 3             # integer K: classes named "0" … "K-1";
//	                         # exactly one of classes and units is required
//	  activation: softmax    # softmax | sigmoid; default softmax
//	  multilabel: false      # boolean; default false; sigmoid only
//	penalty:
//	  l2: 1.0                # λ ≥ 0; default 0
//	  l1: 0                  # λ₁ ≥ 0; default 0
//	  bias: false            # boolean; default false: bias weights unpenalised
//	init:
//	  scheme: glorot-uniform # glorot-uniform | he-uniform | uniform;
//	                         # default glorot-uniform
//	  scale: 0.1             # number ≥ 0; default 0; uniform needs scale > 0
//	  seed: 1                # integer in [0, 2^64−1]; default 1
//	train:                   # defaults for the tool; its flags override them
//	  optimizer: lbfgs       # gd | cg | lbfgs | momentum | adam; default not set
//	  iterations: 400        # integer ≥ 0; 0 = not set
//	  batch: 0               # integer ≥ 0: mini-batch rows for momentum and
//	                         # adam; 0 = all rows
//	  rate: 0.01             # step size for gd, momentum, adam; ≥ 0; 0 = not set
//	  tolerance: 1e-6        # stop when ‖∇J‖ falls below it; ≥ 0; 0 = not set
//
// # Output
//
// With softmax, each row belongs to exactly one class and the output unit k
// gives P(class k | x) = e^(z_k)/Σ_j e^(z_j); softmax needs at least 2
// classes and does not allow multilabel. With sigmoid, each class has an
// independent logistic unit σ(z_k) = 1/(1+e^(−z_k)); it needs at least 2
// classes, or at least 1 with multilabel: true (a row may then carry
// several classes). A sigmoid output with exactly 2 classes that is not
// multilabel has one unit, the probability of the second class
// (Output.Units).
//
// # Penalty
//
// Over m training rows the cost J gains λ/(2m)·Σw² + λ₁/m·Σ|w|, where the
// sums run over every weight, and over the biases too when bias is true.
//
// # Initialisation
//
// Each block's weights are drawn from U(−r, r) with r = √(6/(fan_in+fan_out))
// for glorot-uniform (Glorot & Bengio, 2010), r = √(6/fan_in) for
// he-uniform (He et al., 2015; suits relu and leaky-relu layers) and
// r = scale for uniform. The seed makes the draw repeatable.
//
// # Limits
//
// Limits caps the bytes read (default 1 MiB; a longer input fails with
// ErrTooLarge after reading at most MaxBytes+1 bytes), the param count
// Σ_l (n_{l−1}+1)·n_l over the layer widths n_0 = inputs, …, n_L = output
// units (default 50 000 000; computed without overflow) and the number of
// classes (default 65 536; checked before `units: K` makes K names).
//
// # Errors
//
// Parse reports every problem it finds, not only the first: one problem is
// an *Error, several are an ErrorList sorted by position. Each *Error holds
// the 1-based line and column of the offending key or value, the key path
// (e.g. "hidden[1].activation") and a message that says what was expected,
// and wraps a sentinel such as ErrUnknownField for errors.Is. YAML syntax
// errors carry the line the YAML decoder reported (column 0 = unknown);
// that line may be one before the faulty one for some errors. A tab in
// indentation is reported at the tab (YAML 1.2 §6.1 allows only spaces).
//
// # Writing
//
// Network.WriteYAML writes the canonical form, which Parse reads back to an
// equal Network.
package spec
