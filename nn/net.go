package nn

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/spec"
)

// maxParams bounds the size of a net so that offsets never overflow and a
// mistyped width fails at Compile instead of at allocation.
const maxParams = 1 << 40

// Net is a spec compiled into layer widths and the offsets of every block in
// params. A Net is immutable after Compile and safe for concurrent use; the
// params vector it describes is passed to each call.
type Net struct {
	spec  *spec.Network     // private deep copy
	sizes []int             // n_0 … n_L
	act   []spec.Activation // act[l] is applied to z_{l+1}; act[L−1] is the output activation
	wOff  []int             // wOff[l]: offset of W_l in params
	bOff  []int             // bOff[l]: offset of b_l in params
	np    int               // len(params)
}

// Compile checks s and returns its net. The net keeps its own copy of s.
//
// Compile first calls s.Validate (the spec package's checks, with its
// default limits) and then checks again the invariants the engine relies
// on: Inputs ≥ 1; every hidden layer has Units ≥ 1 and a hidden
// activation (sigmoid, tanh, relu, leaky-relu, softplus, identity); the
// output is softmax with ≥ 2 classes or sigmoid with ≥ 1 class; penalties are
// finite and ≥ 0; the scheme is known and Uniform has a finite Scale > 0.
// Errors wrap ErrSpec and, when Validate fails, its error too, so that
// errors.As(err, new(*spec.Error)) works.
func Compile(s *spec.Network) (*Net, error) {
	if s == nil {
		return nil, fmt.Errorf("%w: nil network", ErrSpec)
	}
	if err := s.Validate(); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrSpec, err)
	}
	if err := check(s); err != nil {
		return nil, err
	}
	c := s.Clone()
	sizes := c.Sizes()
	L := len(sizes) - 1
	n := &Net{
		spec:  c,
		sizes: sizes,
		act:   make([]spec.Activation, L),
		wOff:  make([]int, L),
		bOff:  make([]int, L),
	}
	off := 0
	for l := 0; l < L; l++ {
		if l < L-1 {
			n.act[l] = c.Hidden[l].Activation
		} else {
			n.act[l] = c.Output.Activation
		}
		n.wOff[l] = off
		off += sizes[l+1] * sizes[l]
		n.bOff[l] = off
		off += sizes[l+1]
	}
	n.np = off
	return n, nil
}

func check(s *spec.Network) error {
	if s.Inputs < 1 {
		return fmt.Errorf("%w: inputs %d, want ≥ 1", ErrSpec, s.Inputs)
	}
	if s.Types != nil && len(s.Types) != s.Inputs {
		return fmt.Errorf("%w: %d input types for %d inputs", ErrSpec, len(s.Types), s.Inputs)
	}
	if !s.Resolved() {
		for i, t := range s.Types {
			if t.Units() == 0 {
				return fmt.Errorf("%w: category input %q has no levels yet; they are learned when the encoder is fitted (encode.Fit, as train does), so compile the spec the encoder resolves", ErrSpec, s.Features[i])
			}
		}
	}
	for i, h := range s.Hidden {
		if h.Units < 1 {
			return fmt.Errorf("%w: hidden layer %d: units %d, want ≥ 1", ErrSpec, i, h.Units)
		}
		switch h.Activation {
		case spec.Sigmoid, spec.Tanh, spec.ReLU, spec.LeakyReLU, spec.Softplus, spec.Identity:
		default:
			return fmt.Errorf("%w: hidden layer %d: activation %v not allowed in a hidden layer", ErrSpec, i, h.Activation)
		}
	}
	sizes := s.Sizes()
	total := 0.0
	for l := 1; l < len(sizes); l++ {
		total += float64(sizes[l-1]+1) * float64(sizes[l])
	}
	switch s.Output.Activation {
	case spec.Softmax:
		if len(s.Output.Classes) < 2 {
			return fmt.Errorf("%w: output: softmax needs ≥ 2 classes, have %d", ErrSpec, len(s.Output.Classes))
		}
		if s.Output.Multilabel {
			return fmt.Errorf("%w: output: softmax cannot be multi-label", ErrSpec)
		}
	case spec.Sigmoid:
		if len(s.Output.Classes) < 1 {
			return fmt.Errorf("%w: output: sigmoid needs ≥ 1 class", ErrSpec)
		}
	default:
		return fmt.Errorf("%w: output: activation %v, want softmax or sigmoid", ErrSpec, s.Output.Activation)
	}
	if total > maxParams {
		return fmt.Errorf("%w: %g params, more than %d", ErrSpec, total, int64(maxParams))
	}
	pen := s.Penalty
	if !(pen.L2 >= 0) || math.IsInf(pen.L2, 0) {
		return fmt.Errorf("%w: penalty l2 %g, want finite ≥ 0", ErrSpec, pen.L2)
	}
	if !(pen.L1 >= 0) || math.IsInf(pen.L1, 0) {
		return fmt.Errorf("%w: penalty l1 %g, want finite ≥ 0", ErrSpec, pen.L1)
	}
	switch s.Init.Scheme {
	case spec.GlorotUniform, spec.HeUniform:
	case spec.Uniform:
		if !(s.Init.Scale > 0) || math.IsInf(s.Init.Scale, 0) {
			return fmt.Errorf("%w: init: uniform scale %g, want finite > 0", ErrSpec, s.Init.Scale)
		}
	default:
		return fmt.Errorf("%w: init: unknown scheme %v", ErrSpec, s.Init.Scheme)
	}
	return nil
}

// Spec returns the net's copy of its spec. The caller must not modify it.
func (n *Net) Spec() *spec.Network { return n.spec }

// NumParams returns len(params): Σ_l (n_l + 1)·n_{l+1}.
func (n *Net) NumParams() int { return n.np }

// NumLayers returns the number of weight layers L = len(Hidden) + 1.
func (n *Net) NumLayers() int { return len(n.sizes) - 1 }

// Inputs returns n_0, the number of input features.
func (n *Net) Inputs() int { return n.sizes[0] }

// Outputs returns n_L, the number of output units (1 for a binary sigmoid
// output, else the number of classes).
func (n *Net) Outputs() int { return n.sizes[len(n.sizes)-1] }

// Sizes returns a copy of the layer widths n_0 … n_L.
func (n *Net) Sizes() []int { return append([]int(nil), n.sizes...) }

// Block returns the offsets in params of layer l's weight matrix W_l
// (n_{l+1}·n_l values, row-major) and of its bias vector b_l (n_{l+1}
// values); b = w + n_{l+1}·n_l. It panics if l is out of range.
func (n *Net) Block(l int) (w, b int) { return n.wOff[l], n.bOff[l] }

func (n *Net) checkParams(params []float64) {
	if len(params) != n.np {
		panic(fmt.Sprintf("nn: params has length %d, net needs %d", len(params), n.np))
	}
}

// weights returns W_l as a blas64.General sharing memory with params.
func (n *Net) weights(params []float64, l int) blas64.General {
	r, c := n.sizes[l+1], n.sizes[l]
	return blas64.General{Rows: r, Cols: c, Stride: c, Data: params[n.wOff[l] : n.wOff[l]+r*c]}
}

// Weights returns a view of W_l, n_{l+1} × n_l, sharing memory with params:
// writes through the view change params.
func (n *Net) Weights(params []float64, l int) *mat.Dense {
	n.checkParams(params)
	var d mat.Dense
	d.SetRawMatrix(n.weights(params, l))
	return &d
}

// Bias returns a view of b_l (n_{l+1} values) sharing memory with params.
func (n *Net) Bias(params []float64, l int) *mat.VecDense {
	n.checkParams(params)
	k := n.sizes[l+1]
	return mat.NewVecDense(k, params[n.bOff[l]:n.bOff[l]+k])
}

// Pack copies the weight matrices w[l] (n_{l+1} × n_l) and bias vectors b[l]
// (n_{l+1}) into dst, which must have length NumParams. It panics if a
// length or shape does not match the net.
func (n *Net) Pack(dst []float64, w []*mat.Dense, b []*mat.VecDense) {
	n.checkParams(dst)
	L := n.NumLayers()
	if len(w) != L || len(b) != L {
		panic(fmt.Sprintf("nn: Pack got %d weight and %d bias layers, net has %d", len(w), len(b), L))
	}
	for l := 0; l < L; l++ {
		if r, c := w[l].Dims(); r != n.sizes[l+1] || c != n.sizes[l] {
			panic(fmt.Sprintf("nn: Pack: layer %d weights are %d×%d, want %d×%d", l, r, c, n.sizes[l+1], n.sizes[l]))
		}
		if b[l].Len() != n.sizes[l+1] {
			panic(fmt.Sprintf("nn: Pack: layer %d bias has %d values, want %d", l, b[l].Len(), n.sizes[l+1]))
		}
		n.Weights(dst, l).Copy(w[l])
		n.Bias(dst, l).CopyVec(b[l])
	}
}

// Unpack returns copies of every W_l and b_l held in params.
func (n *Net) Unpack(params []float64) (w []*mat.Dense, b []*mat.VecDense) {
	n.checkParams(params)
	L := n.NumLayers()
	w = make([]*mat.Dense, L)
	b = make([]*mat.VecDense, L)
	for l := 0; l < L; l++ {
		w[l] = mat.DenseCopyOf(n.Weights(params, l))
		b[l] = mat.VecDenseCopyOf(n.Bias(params, l))
	}
	return w, b
}

// FLOPs returns the approximate floating-point operations per example
// (per row) of a forward pass (predict) and of a cost-and-gradient
// evaluation (evaluate). A multiply-add counts 2, every other arithmetic
// operation and every activation, derivative or loss term counts 1:
//
//	predict  = Σ_l (2·n_l·n_{l+1} + 2·n_{l+1})                      (product, bias, activation)
//	evaluate = predict + Σ_l (2·n_l·n_{l+1} + n_{l+1})              (∂W_l, ∂b_l)
//	                   + Σ_{l≥1} (2·n_l·n_{l+1} + 2·n_l)            (δ_l = W_lᵀ δ_{l+1} ⊙ g′(z_l))
//
// so evaluate ≈ 3·predict for wide layers.
func (n *Net) FLOPs() (predict, evaluate float64) {
	for l := 0; l+1 < len(n.sizes); l++ {
		in, out := float64(n.sizes[l]), float64(n.sizes[l+1])
		predict += 2*in*out + 2*out
		evaluate += 2*in*out + out
		if l >= 1 {
			evaluate += 2*in*out + 2*in
		}
	}
	return predict, predict + evaluate
}
