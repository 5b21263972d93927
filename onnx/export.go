package onnx

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"

	"google.golang.org/protobuf/proto"

	"github.com/seine-ml/seine/encode"
	pb "github.com/seine-ml/seine/internal/onnxpb"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// IRVersion is the ONNX IR version of every exported model (ONNX 1.10 to
// 1.12 write it).
const IRVersion = 8

// Opsets of the default domain ("ai.onnx") an exported model may declare.
// Every operator the graph uses has the same meaning in all of them.
const (
	MinOpset     = 13
	MaxOpset     = 17
	DefaultOpset = 17
)

// Names of the graph's fixed inputs and outputs and of the metadata keys.
const (
	NumbersInput       = "numbers"         // float64 [N, number inputs]
	ProbabilitiesOut   = "probabilities"   // float64 [N, classes]
	LabelOut           = "label"           // int64 [N]
	LabelsOut          = "labels"          // int64 [N, classes], multi-label models only
	MetaClasses        = "classes"         // JSON list of the class names, in output order
	MetaSpecName       = "spec_name"       // the spec's name; "" when it has none
	MetaSeineVersion   = "seine_version"   // nn.Version of the exporting library
	MetaModelSHA256    = "model_sha256"    // the model file's content digest
	MetaNumberInputs   = "number_inputs"   // JSON list of the columns of NumbersInput, in order
	MetaCategoryInputs = "category_inputs" // JSON list of the category inputs' names, in order
	MetaTemperature    = "temperature"     // the model's temperature, when it has one
	MetaThresholds     = "thresholds"      // JSON list of the model's operating thresholds, when it has them
)

// Options set an export. The zero value writes DefaultOpset.
type Options struct {
	// Opset is the default-domain opset the model declares, MinOpset to
	// MaxOpset; 0 means DefaultOpset.
	Opset int
}

// Errors of an export. A model that cannot be exported gives an error
// wrapping ErrUnsupported that names the feature.
var (
	ErrUnsupported = errors.New("onnx: cannot export")
	ErrOptions     = errors.New("onnx: bad options")
)

// Check reports whether m can be exported: nil when it can, else an error
// wrapping ErrUnsupported that names the feature that cannot be. It is what
// Write checks first.
func Check(m *nn.Model) error {
	_, err := build(m, DefaultOpset, false)
	return err
}

// Write writes m as an ONNX model (protobuf binary) to w. See the package
// documentation for the graph. Nothing is written when m cannot be
// exported or opt is bad.
func Write(w io.Writer, m *nn.Model, opt Options) error {
	opset := opt.Opset
	if opset == 0 {
		opset = DefaultOpset
	}
	if opset < MinOpset || opset > MaxOpset {
		return fmt.Errorf("%w: opset %d, want %d to %d", ErrOptions, opt.Opset, MinOpset, MaxOpset)
	}
	mp, err := build(m, opset, true)
	if err != nil {
		return err
	}
	b, err := proto.MarshalOptions{Deterministic: true}.Marshal(mp)
	if err != nil {
		return fmt.Errorf("onnx: encoding the model: %w", err)
	}
	_, err = w.Write(b)
	return err
}

// unsupported returns an error naming a feature that has no export.
func unsupported(format string, a ...any) error {
	return fmt.Errorf("%w: %s", ErrUnsupported, fmt.Sprintf(format, a...))
}

// build returns the ONNX model of m. With full false it checks only and
// leaves out the digest (which writes the whole model file).
func build(m *nn.Model, opset int, full bool) (*pb.ModelProto, error) {
	if m == nil || m.Net() == nil || m.Encoder() == nil {
		return nil, unsupported("no model (build it with nn.NewModel, train.Train or nn.Load)")
	}
	s, net, enc := m.Spec(), m.Net(), m.Encoder()
	name := s.Name
	if name == "" {
		name = "seine"
	}
	b := newGraph(name)
	b.shapeOnly = !full

	// Fixed names first, so that no internal tensor can take them.
	inputs := enc.Inputs()
	var numbers, categories []string
	for _, in := range inputs {
		switch in.Type {
		case spec.NumberInput:
			numbers = append(numbers, in.Name)
		case spec.CategoryInput:
			categories = append(categories, in.Name)
		default:
			return nil, unsupported("input %q: input type %v", in.Name, in.Type)
		}
	}
	b.reserve(ProbabilitiesOut)
	b.reserve(LabelOut)
	if s.Output.Multilabel {
		b.reserve(LabelsOut)
	}
	if len(numbers) > 0 {
		b.reserve(NumbersInput)
	}
	for _, c := range categories {
		if !b.reserve(c) {
			return nil, unsupported("category input %q: the graph's own input or output %q has that name; rename the input", c, c)
		}
	}

	units, err := encoderGraph(b, inputs, enc.MissingTokens(), len(numbers))
	if err != nil {
		return nil, err
	}
	if err := netGraph(b, m, net, units); err != nil {
		return nil, err
	}

	classes, err := json.Marshal(m.Classes())
	if err != nil {
		return nil, fmt.Errorf("onnx: class names: %w", err)
	}
	meta := []*pb.StringStringEntryProto{
		{Key: proto.String(MetaClasses), Value: proto.String(string(classes))},
		{Key: proto.String(MetaSpecName), Value: proto.String(s.Name)},
		{Key: proto.String(MetaSeineVersion), Value: proto.String(nn.Version)},
		{Key: proto.String(MetaNumberInputs), Value: proto.String(jsonList(numbers))},
		{Key: proto.String(MetaCategoryInputs), Value: proto.String(jsonList(categories))},
	}
	if d := m.Decision(); !d.IsZero() {
		if t := d.Temperature; t != 0 && t != 1 {
			meta = append(meta, &pb.StringStringEntryProto{Key: proto.String(MetaTemperature), Value: proto.String(strconv.FormatFloat(t, 'g', -1, 64))})
		}
		if d.Thresholds != nil {
			th, err := json.Marshal(d.Thresholds)
			if err != nil {
				return nil, fmt.Errorf("onnx: thresholds: %w", err)
			}
			meta = append(meta, &pb.StringStringEntryProto{Key: proto.String(MetaThresholds), Value: proto.String(string(th))})
		}
	}
	if full {
		sum, err := modelDigest(m)
		if err != nil {
			return nil, err
		}
		meta = append(meta, &pb.StringStringEntryProto{Key: proto.String(MetaModelSHA256), Value: proto.String(sum)})
	}
	return &pb.ModelProto{
		IrVersion:       proto.Int64(IRVersion),
		OpsetImport:     []*pb.OperatorSetIdProto{{Domain: proto.String(""), Version: proto.Int64(int64(opset))}},
		ProducerName:    proto.String("seine"),
		ProducerVersion: proto.String(nn.Version),
		DocString:       proto.String("A seine classifier: raw inputs to class probabilities and the classes decided by the model's decision (its operating thresholds, else the most probable class)."),
		Graph:           b.g,
		MetadataProps:   meta,
	}, nil
}

func jsonList(v []string) string {
	if v == nil {
		v = []string{}
	}
	b, _ := json.Marshal(v) // strings always marshal
	return string(b)
}

// modelDigest returns the SHA-256 content digest that m's model file
// carries (its "sha256" field), so that an exported graph names the exact
// model it came from.
func modelDigest(m *nn.Model) (string, error) {
	var buf bytes.Buffer
	if _, err := m.WriteTo(&buf); err != nil {
		return "", fmt.Errorf("onnx: writing the model to take its digest: %w", err)
	}
	var f struct {
		SHA256 string `json:"sha256"`
	}
	if err := json.Unmarshal(buf.Bytes(), &f); err != nil || f.SHA256 == "" {
		return "", fmt.Errorf("onnx: the model file has no sha256 field (%v)", err)
	}
	return f.SHA256, nil
}

// encoderGraph adds the inputs and the nodes that turn them into the net's
// input units, in the encoder's unit order, and returns the name of the
// units tensor (float64 [N, width]).
//
// Numbers: u = (Where(IsNaN(x), fill, x) − mean) / scale, column by column,
// fill being NaN under the refuse rule (so a missing value stays NaN, as in
// encode.Encoder.Expand).
//
// Categories: TfIdfVectorizer with the levels and then the missing tokens
// as its pool of 1-grams counts, for each row's single text, which pool
// entry it is (float32 0 or 1, so the cast to float64 is exact); a product
// with a 0/1 matrix then maps pool entries to units: level k to unit k, a
// missing token to the missing level's unit (missing: level), to the
// mode's unit (missing: mode) or to no unit (missing: refuse). A text that
// is neither a level nor a token matches nothing and gives all zeros.
func encoderGraph(b *graph, inputs []encode.Input, tokens []string, nNumbers int) (string, error) {
	var num string // number units [N, nNumbers]
	if nNumbers > 0 {
		b.input(NumbersInput, tDouble, nNumbers, "the number inputs in order (metadata number_inputs); NaN is a missing value")
		fill := make([]float64, 0, nNumbers)
		mean := make([]float64, 0, nNumbers)
		scale := make([]float64, 0, nNumbers)
		fills := false
		for _, in := range inputs {
			if in.Type != spec.NumberInput {
				continue
			}
			switch in.Missing {
			case spec.MissingRefuse:
			case spec.MissingMean, spec.MissingMedian, spec.MissingMode, spec.MissingConstant:
				fills = true
			default:
				return "", unsupported("number input %q: missing rule %v", in.Name, in.Missing)
			}
			fill = append(fill, in.Fill)
			mean = append(mean, in.Mean)
			scale = append(scale, in.Scale)
		}
		x := NumbersInput
		if fills {
			nan := b.node("IsNaN", "missing", []string{x})
			x = b.node("Where", "filled", []string{nan, b.doubles("fill", []int64{int64(nNumbers)}, fill), x})
		}
		x = b.node("Sub", "centred", []string{x, b.doubles("mean", []int64{int64(nNumbers)}, mean)})
		num = b.node("Div", "number_units", []string{x, b.doubles("scale", []int64{int64(nNumbers)}, scale)})
	}

	var parts []string // unit blocks in encoder order
	j := 0             // next column of num
	for i := 0; i < len(inputs); {
		in := inputs[i]
		if in.Type == spec.NumberInput {
			k := i
			for k < len(inputs) && inputs[k].Type == spec.NumberInput {
				k++
			}
			run := k - i
			if run == nNumbers {
				parts = append(parts, num)
			} else {
				parts = append(parts, b.node("Slice", "number_units", []string{num,
					b.int64s("starts", []int64{int64(j)}), b.int64s("ends", []int64{int64(j + run)}), b.int64s("axes", []int64{1})}))
			}
			j += run
			i = k
			continue
		}
		u, err := categoryGraph(b, in, tokens)
		if err != nil {
			return "", err
		}
		parts = append(parts, u)
		i++
	}
	if len(parts) == 1 {
		return parts[0], nil
	}
	return b.node("Concat", "units", parts, attrInt("axis", 1)), nil
}

// categoryGraph adds the string input of the category in and the nodes
// that one-hot encode it; it returns the units tensor [N, in.Units()].
func categoryGraph(b *graph, in encode.Input, tokens []string) (string, error) {
	b.input(in.Name, tString, 1, "category input "+strconv.Quote(in.Name)+": one text per row, without surrounding spaces")
	pool := slices.Clone(in.Levels)
	for _, t := range tokens {
		if !slices.Contains(pool, t) {
			pool = append(pool, t)
		}
	}
	L, U, P := len(in.Levels), in.Units(), len(pool)
	m := make([]float64, P*U) // pool entry → unit, row-major P × U
	for k := 0; k < L; k++ {
		m[k*U+k] = 1
	}
	for p := L; p < P; p++ {
		switch in.Missing {
		case spec.MissingLevel:
			m[p*U+L] = 1
		case spec.MissingMode:
			m[p*U+int(in.Fill)] = 1
		case spec.MissingRefuse:
		default:
			return "", unsupported("category input %q: missing rule %v", in.Name, in.Missing)
		}
	}
	switch in.Unknown {
	case spec.UnknownRefuse, spec.UnknownIgnore: // both give zeros in the graph (see the package doc)
	default:
		return "", unsupported("category input %q: unknown-level rule %v", in.Name, in.Unknown)
	}
	idx := make([]int64, P)
	for p := range idx {
		idx[p] = int64(p)
	}
	counts := b.node("TfIdfVectorizer", in.Name+"_counts", []string{in.Name},
		attrString("mode", "TF"),
		attrInt("min_gram_length", 1), attrInt("max_gram_length", 1), attrInt("max_skip_count", 0),
		attrInts("ngram_counts", []int64{0}), attrInts("ngram_indexes", idx),
		attrStrings("pool_strings", pool))
	counts = b.node("Cast", in.Name+"_counts", []string{counts}, attrInt("to", int64(tDouble)))
	return b.node("MatMul", in.Name+"_units", []string{counts, b.doubles(in.Name+"_map", []int64{int64(P), int64(U)}, m)}), nil
}

// netGraph adds the layers, the output activation, the decision and the
// graph outputs.
func netGraph(b *graph, m *nn.Model, net *nn.Net, units string) error {
	sizes := net.Sizes()
	L := net.NumLayers()
	T := m.Decision().Temperature
	a := units
	s := m.Spec()
	var params []float64 // a copy of the model's: taken only when values are written
	if !b.shapeOnly {
		params = m.Params()
	}
	for l := 0; l < L; l++ {
		w, bo := net.Block(l)
		nin, nout := sizes[l], sizes[l+1]
		layer := strconv.Itoa(l + 1)
		var wv, bv []float64
		if params != nil {
			wv, bv = params[w:w+nout*nin], params[bo:bo+nout]
		}
		if l == L-1 && T != 0 && T != 1 {
			// Temperature scaling folded into the output layer as nn
			// does it: g((W a + b)/T) computed as g((W/T) a + b/T), each
			// weight divided once.
			wv, bv = slices.Clone(wv), slices.Clone(bv)
			for i := range wv {
				wv[i] /= T
			}
			for i := range bv {
				bv[i] /= T
			}
		}
		W := b.doubles("W"+layer, []int64{int64(nout), int64(nin)}, wv)
		bias := b.doubles("b"+layer, []int64{int64(nout)}, bv)
		z := b.node("Gemm", "z"+layer, []string{a, W, bias}, attrInt("transB", 1))
		if l == L-1 {
			a = z
			break
		}
		var err error
		if a, err = hidden(b, s.Hidden[l].Activation, z, "a"+layer); err != nil {
			return unsupported("hidden layer %d: %v", l+1, err)
		}
	}
	out := s.Output
	K := len(m.Classes())
	th := m.Decision().Thresholds
	binary := out.Activation == spec.Sigmoid && out.Units() == 1 && K == 2
	switch {
	case out.Activation == spec.Softmax:
		b.nodeTo("Softmax", ProbabilitiesOut, []string{a}, attrInt("axis", 1))
	case binary:
		// One unit: p is the probability of Classes[1]; [1 − p, p] as nn.
		p := sigmoid(b, a, "p")
		q := b.node("Sub", "q", []string{b.scalar("one", 1), p})
		b.nodeTo("Concat", ProbabilitiesOut, []string{q, p}, attrInt("axis", 1))
		if len(th) == 1 {
			// The operating threshold t: class 1 where p ≥ t.
			yes := b.node("GreaterOrEqual", "decided", []string{p, b.scalar("threshold", th[0])})
			yes = b.node("Cast", "decided", []string{yes}, attrInt("to", int64(tInt64)))
			b.nodeTo("Reshape", LabelOut, []string{yes, b.int64s("shape", []int64{-1})})
		}
	case out.Activation == spec.Sigmoid:
		b.nodeTo("Identity", ProbabilitiesOut, []string{sigmoid(b, a, "p")})
	default:
		return unsupported("output activation %v", out.Activation)
	}
	if !binary || len(th) != 1 {
		b.nodeTo("ArgMax", LabelOut, []string{ProbabilitiesOut}, attrInt("axis", 1), attrInt("keepdims", 0), attrInt("select_last_index", 0))
	}
	b.output(ProbabilitiesOut, tDouble, "class probabilities, columns in the order of metadata classes", rowDim(), fixedDim(K))
	b.output(LabelOut, tInt64, "index in metadata classes of the class decided: the most probable (the first on a tie), or for a binary model with an operating threshold t, 1 where the probability of class 1 is at least t", rowDim())
	if out.Multilabel {
		// The classes present: p_k ≥ t_k, with the model's operating
		// thresholds, else 0.5 (as seine predict decides).
		t := th
		if t == nil {
			t = make([]float64, K)
			for k := range t {
				t[k] = 0.5
			}
		}
		present := b.node("GreaterOrEqual", "present", []string{ProbabilitiesOut, b.doubles("thresholds", []int64{int64(K)}, t)})
		b.nodeTo("Cast", LabelsOut, []string{present}, attrInt("to", int64(tInt64)))
		b.output(LabelsOut, tInt64, "multi-label only: 1 where a class is present (its probability at least its threshold), else 0", rowDim(), fixedDim(K))
	}
	return nil
}

// sigmoid adds σ(z) computed as nn does, from e = e^(−|z|): 1/(1+e) for
// z ≥ 0 and e/(1+e) otherwise, accurate relative to σ(z) however small it
// is. The runtimes' own float64 Sigmoid need not be: onnxruntime-web 1.30's
// gives σ(−10.3) = 3.35e-5 off by 1.5e-12 relative, an absolute error of
// about ulp(1)/2, as from 1/2 + tanh(z/2)/2.
func sigmoid(b *graph, z, out string) string {
	one := b.scalar("one", 1)
	e := expNegAbs(b, z, out)
	d := b.node("Add", out+"_d", []string{one, e})
	pos := b.node("Div", out+"_pos", []string{one, d})
	neg := b.node("Div", out+"_neg", []string{e, d})
	return b.node("Where", out, []string{b.node("GreaterOrEqual", out+"_nonneg", []string{z, b.scalar("zero", 0)}), pos, neg})
}

// expNegAbs adds e^(−|z|), the term of sigmoid and softplus that cannot
// overflow, and returns its name.
func expNegAbs(b *graph, z, out string) string {
	return b.node("Exp", out+"_e", []string{b.node("Neg", out+"_negabs", []string{b.node("Abs", out+"_abs", []string{z})})})
}

// hidden adds the activation g of the pre-activations z and returns the
// name of the activations. Softplus and leaky-relu are composed from basic
// operators, in float64 throughout (see the package doc).
func hidden(b *graph, g spec.Activation, z, out string) (string, error) {
	switch g {
	case spec.Sigmoid:
		return sigmoid(b, z, out), nil
	case spec.Tanh:
		return b.node("Tanh", out, []string{z}), nil
	case spec.ReLU:
		return b.node("Relu", out, []string{z}), nil
	case spec.Identity:
		return z, nil
	case spec.LeakyReLU:
		// z if z > 0 else 0.01·z, as nn.
		pos := b.node("Greater", out+"_positive", []string{z, b.scalar("zero", 0)})
		neg := b.node("Mul", out+"_negative", []string{z, b.scalar("leaky_slope", 0.01)})
		return b.node("Where", out, []string{pos, z, neg}), nil
	case spec.Softplus:
		// max(z, 0) + log1p(e^(−|z|)), with log1p(e) = e when 1 ⊕ e = 1
		// and ln(u)·e/(u − 1) for u = 1 ⊕ e otherwise: the rounding of
		// 1 + e cancels in the ratio, which leaves a few ulp of error
		// (Goldberg 1991, "What every computer scientist should know about
		// floating-point arithmetic", Theorem 4, after Kahan).
		one := b.scalar("one", 1)
		e := expNegAbs(b, z, out)
		u := b.node("Add", out+"_u", []string{one, e})
		ratio := b.node("Div", out+"_ratio", []string{
			b.node("Mul", out+"_loge", []string{b.node("Log", out+"_logu", []string{u}), e}),
			b.node("Sub", out+"_u1", []string{u, one}),
		})
		log1p := b.node("Where", out+"_log1p", []string{b.node("Equal", out+"_small", []string{u, one}), e, ratio})
		return b.node("Add", out, []string{b.node("Max", out+"_max", []string{z, b.scalar("zero", 0)}), log1p}), nil
	}
	return "", fmt.Errorf("activation %v has no export", g)
}
