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
//	inputs: 12               # required; integer ≥ 1 (that many number
//	                         # inputs, CSV columns taken in order), or a list
//	                         # of inputs (see Inputs below; CSV columns are
//	                         # then picked by name, in any order)
//	missing_tokens: ["", "?", "NA"] # list of cell texts that count as missing;
//	                         # default "", "?", "NA"; [] = none
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
//	  class_weights: balanced # balanced, or a mapping class name → weight > 0
//	                         # (e.g. {fraud: 20}); default every class 1
//
// # Inputs
//
// Each entry of a list of inputs is a bare name, which is a number input
// that refuses missing cells, or a mapping:
//
//	inputs:
//	  - req_per_min            # a number, as a bare name
//	  - name: plan             # required; distinct, non-empty
//	    type: category         # number | category; default number
//	    levels: [basic, pro, team] # category only; optional: learned from
//	                           # the training rows when absent
//	  - name: tenure
//	    missing: median        # number: refuse | mean | median | mode |
//	                           # a finite number (a constant fill);
//	                           # category: refuse | level | mode;
//	                           # default refuse
//	  - name: region
//	    type: category
//	    missing: level         # a unit of its own for missing cells
//	    unknown: ignore        # category only: refuse | ignore; default refuse
//
// A number input is one input unit: a missing cell is filled by its rule
// (mean, median or mode of the training rows, or the constant), then the
// value is standardised with the scaler. A category of L levels is L
// units, one-hot and not scaled; with missing: level it has L+1 units, the
// last one marking a missing cell; with missing: mode a missing cell counts
// as the most frequent training level (on ties, the first in level order).
// For a number, mode is the most frequent training value (on ties, the
// smallest).
// With unknown: ignore, a level never seen in training sets all the input's
// units to 0 at prediction; with refuse (the default) it is an error.
//
// Declared levels are at least 2, distinct, non-empty, without surrounding
// spaces (cells are trimmed before they are compared), and none of them
// may be a missing token; their order is the order of the units. Levels
// that are not declared are learned from the training rows only and stored
// in the spec a model holds, in this order: ascending by value when every
// level is an integer (so "2" comes before "10"), else in byte order of
// the texts (so "B" comes before "a"). The fill values of mean, median and
// mode are likewise fitted on the training rows only.
//
// A cell counts as missing when its text, with surrounding spaces
// trimmed, is one of missing_tokens; each token is given once and without
// surrounding spaces.
//
// # Class weights
//
// A class weight w_k multiplies the cross-entropy terms of class k. With
// class_weights: balanced, w_k = m/(K·m_k) for m training rows, K classes
// and m_k training rows of class k; with a mapping, each named class (an
// output class) gets its weight > 0 and the others 1. For a multi-label
// output, m_k counts the rows that carry class k and the weight applies to
// the positive side of each class. The penalty is not weighted.
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
// ErrTooLarge after reading at most MaxBytes+1 bytes) and, with the same
// bound, the spec as the parser sees it: each alias counts as a copy of
// its anchored value, so a short spec cannot stand for one far longer than
// its readers accept (an alias bomb is refused at the alias that passes
// the limit, before anything is built from it). It also caps the param count
// Σ_l (n_{l−1}+1)·n_l over the layer widths n_0 = inputs, …, n_L = output
// units (default 50 000 000; computed without overflow; n_0 counts the
// declared levels, and one unit for a category whose levels are still to
// be learned), the number of classes (default 65 536; checked before
// `units: K` makes K names) and the number of declared levels of each
// category (default 65 536; checked before the levels are copied).
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
// equal Network: a plain number input as a bare name, any other input as a
// mapping with only its non-default keys in the order name, type, levels,
// missing, unknown; missing_tokens only when they differ from the default;
// class weights as balanced or a mapping in class order.
package spec
