// Package onnx exports a trained model as an ONNX model (Open Neural
// Network Exchange, the open standard format for such graphs), so that
// another stack can run the same model, from raw inputs to probabilities,
// without retraining it or writing the encoder again.
//
// Write writes the model; Check says whether a model can be exported and,
// if not, which feature cannot (an error wrapping ErrUnsupported). Nothing
// is exported that would compute a different function.
//
// # Format
//
// IR version 8 (IRVersion) with one default-domain opset import,
// DefaultOpset (17) unless Options.Opset asks for another from MinOpset
// (13) to MaxOpset (17): ONNX 1.12, whose checker knows opsets up to 17.
// Every operator used means the same in all of them. No other domain is
// imported. The messages are generated from the ONNX project's onnx.proto
// (package internal/onnxpb) and encoded by google.golang.org/protobuf.
//
// # Inputs
//
//	numbers   float64 [N, n]  the n number inputs, in the model's input
//	                          order; NaN is a missing value. Absent when
//	                          the model has no number input.
//	NAME      string [N, 1]   one per category input, named after it: the
//	                          cell text, without surrounding spaces.
//
// N, the number of rows, is free ("N" in the graph). The metadata lists
// the columns of numbers (number_inputs) and the category inputs
// (category_inputs) in order.
//
// # Outputs
//
//	probabilities  float64 [N, K]  one column per class, in the order of
//	                               the metadata's classes
//	label          int64 [N]       the index of the class decided: the most
//	                               probable (the first on a tie), or, for a
//	                               binary sigmoid model with an operating
//	                               threshold t, 1 where p ≥ t
//	labels         int64 [N, K]    multi-label models only: 1 where the
//	                               class is present, its probability being
//	                               at least its operating threshold (0.5
//	                               when the model has none), else 0
//
// These are the decisions of nn.Model.Predict and Labels (see nn.Decision).
//
// # Graph
//
// For a number input with fill value f, centre μ and scale s (as fitted
// into the model's encoder):
//
//	u = (x − μ)/s, with x replaced by f where it is NaN (Where, IsNaN)
//
// Under the refuse rule f is NaN, so a missing number stays NaN and makes
// the row's probabilities NaN. A category input with levels l_1 … l_L and
// the model's missing tokens t_1 … t_T becomes its units by
// TfIdfVectorizer (1-grams, mode TF) over the pool l_1 … l_L, t_1 … t_T,
// which gives a 0/1 count per pool entry (float32; 0 and 1 cast to float64
// exactly), and a product with a constant 0/1 matrix that sends level k to
// unit k and a missing token to the extra unit (missing: level), to the
// mode's unit (missing: mode) or to none (missing: refuse). The units of
// all inputs are concatenated in the model's input order. Then each layer
//
//	z_{l+1} = a_l·W_lᵀ + b_l  (Gemm, transB = 1),   a_{l+1} = g(z_{l+1})
//
// with W_l and b_l stored bit for bit as float64, and g one of
//
//	sigmoid     1/(1+e) for z ≥ 0, else e/(1+e), e = exp(−|z|)
//	tanh        Tanh
//	relu        Relu
//	leaky-relu  Where(z > 0, z, 0.01·z)
//	softplus    max(z, 0) + log1p(exp(−|z|)), log1p composed from Log
//	            (Goldberg 1991, Theorem 4)
//	identity    none
//
// The output is Softmax of z_L, or the sigmoid above per unit; a binary
// sigmoid model has one unit giving p, the probability of the second
// class, and probabilities = [1 − p, p]. A model with a temperature T
// (nn.Decision) computes g(z_L/T) as nn does, with the output layer's
// weights and bias divided by T once, when the graph is written.
//
// Everything is computed in float64 and nothing is cast to float32. The
// WebAssembly build of the ONNX runtime has no float64 kernel for Softplus,
// takes LeakyRelu's slope as a float32 attribute (0.01 becomes
// 0.009999999776…), and its float64 Sigmoid is accurate in absolute but
// not relative terms; so those three are composed from Exp, Log, Abs, Max,
// Where and arithmetic, in the same numerically stable forms as package
// nn. The tests check that the runtime (onnxruntime-web, run by node)
// agrees with Model.ProbabilitiesSet within 1e-12 relative on every row
// and that the ONNX checker (python3-onnx 1.12, full checks) accepts every
// exported model.
//
// # Metadata
//
// The model's metadata_props hold classes (the class names, a JSON list),
// spec_name, seine_version (nn.Version of the exporting library),
// model_sha256 (the content digest written in the model file, naming the
// exact model exported), number_inputs and category_inputs, and, when the
// model has them, temperature and thresholds (a JSON list). producer_name
// is "seine".
//
// # Differences from seine's own prediction
//
// The graph computes the model's function on every row seine accepts. It
// cannot refuse a row, so rows that seine refuses get an answer:
//
//   - a category level never seen in training gives all-zero units, as
//     under `unknown: ignore`, even when the input's rule is
//     `unknown: refuse` (seine predict refuses such a row);
//   - a missing category under `missing: refuse` gives all-zero units;
//     a missing number under refuse, NaN probabilities (seine refuses both);
//   - ±Inf numbers are computed with (seine refuses them);
//   - category text is compared exactly: seine trims surrounding spaces
//     from a cell first, so the caller must pass trimmed text.
//
// A category input named probabilities or label, labels in a multi-label
// model, or numbers in a model with number inputs, cannot be exported (its tensor would have the name
// of one of the graph's own); rename it.
package onnx
