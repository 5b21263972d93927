package nn

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"

	"github.com/seine-ml/seine/spec"
)

// sub returns the r×c submatrix of g whose top-left element is g[i, j].
func sub(g blas64.General, i, j, r, c int) blas64.General {
	return blas64.General{Rows: r, Cols: c, Stride: g.Stride, Data: g.Data[i*g.Stride+j : (i+r-1)*g.Stride+j+c]}
}

// gemm computes C = alpha·op(A)·op(B) + beta·C with the backend of the
// build (product, in tile.go or blas_openblas.go), packing into w.pack.
// The order of every sum depends only on the shapes (see internal/gemm),
// never on which worker runs the product.
func (w *work) gemm(tA, tB blas.Transpose, alpha float64, a, b blas64.General, beta float64, c blas64.General) {
	product(w.pack, tA, tB, alpha, a, b, beta, c)
}

// work holds the buffers of one forward and backward pass over up to rows
// rows: for layer l = 1…L, z[l−1] and a[l−1] hold Z_l and A_l and d[l−1]
// holds Δ_l (all row-major, rows × n_l). grad (NumParams values, set by
// the owner before a backward eval) receives the summed (not yet averaged)
// gradient of the rows; loss their summed loss. pack is the scratch in
// which gemm packs its operands, long enough for every product of a pass.
type work struct {
	rows    int
	z, a, d [][]float64
	grad    []float64
	loss    float64
	cw      *classWeights // nil: every class weighs 1
	pack    []float64
}

// classWeights are the factors of the weighted cross-entropy per output
// unit: for softmax w[k] on class k; for sigmoid units pos[k] on the
// positive side (y_k = 1) and neg[k] on the negative side.
type classWeights struct {
	w, pos, neg []float64
}

// newClassWeights lays the per-class weights w out per output unit of n:
// softmax units take w_k; a binary sigmoid unit (classes c0, c1) takes w_1
// on its positive and w_0 on its negative side; multi-label sigmoid units
// take w_k on the positive side and 1 on the negative.
func newClassWeights(n *Net, w []float64) *classWeights {
	cw := &classWeights{}
	switch {
	case n.spec.Output.Activation == spec.Softmax:
		cw.w = slices.Clone(w)
	case n.Outputs() == 1:
		cw.pos, cw.neg = []float64{w[1]}, []float64{w[0]}
	default:
		cw.pos = slices.Clone(w)
		cw.neg = ones(len(w))
	}
	return cw
}

func newWork(n *Net, rows int, backward bool) *work {
	rows = max(rows, 1)
	L := n.NumLayers()
	w := &work{rows: rows, z: make([][]float64, L), a: make([][]float64, L)}
	if backward {
		w.d = make([][]float64, L)
	}
	for l := 0; l < L; l++ {
		k := rows * n.sizes[l+1]
		w.z[l] = make([]float64, k)
		w.a[l] = make([]float64, k)
		if backward {
			w.d[l] = make([]float64, k)
		}
	}
	w.pack = make([]float64, packLen(n, rows, backward))
	return w
}

// packLen returns the length of work.pack for passes over up to rows rows:
// the most that any product of the pass needs (forward Z_{l+1} = A_l·W_lᵀ,
// rows × n_{l+1} over n_l; backward ∂W_l = Δ_{l+1}ᵀ·A_l, n_{l+1} × n_l
// over rows, and Δ_l = Δ_{l+1}·W_l, rows × n_l over n_{l+1}).
func packLen(n *Net, rows int, backward bool) int {
	words := 0
	for l := 0; l+1 < len(n.sizes); l++ {
		in, out := n.sizes[l], n.sizes[l+1]
		words = max(words, productBufLen(rows, out, in))
		if backward {
			words = max(words, productBufLen(out, in, rows), productBufLen(rows, in, out))
		}
	}
	return words
}

func mat64(data []float64, r, c int) blas64.General {
	return blas64.General{Rows: r, Cols: c, Stride: c, Data: data[:r*c]}
}

// forward computes Z_l = A_{l−1}·W_{l−1}ᵀ + 1·b_{l−1}ᵀ and A_l = g(Z_l) for
// the hidden layers and returns Z_L, the output pre-activations. x holds the
// rows (A_0), x.Rows ≤ w.rows.
func (w *work) forward(n *Net, params []float64, x blas64.General) blas64.General {
	r := x.Rows
	in := x
	L := n.NumLayers()
	for l := 0; l < L; l++ {
		k := n.sizes[l+1]
		z := mat64(w.z[l], r, k)
		b := params[n.bOff[l] : n.bOff[l]+k]
		for i := 0; i < r; i++ {
			copy(z.Data[i*k:(i+1)*k], b)
		}
		w.gemm(blas.NoTrans, blas.Trans, 1, in, n.weights(params, l), 1, z)
		if l == L-1 {
			return z
		}
		a := mat64(w.a[l], r, k)
		activate(n.act[l], a.Data, z.Data)
		in = a
	}
	panic("unreachable")
}

// probabilities sets h to the output probabilities for pre-activations z:
// σ(z_k) per unit, or softmax e^(z_k−max)/Σ_j e^(z_j−max) per row.
func probabilities(g spec.Activation, h []float64, z blas64.General) {
	K := z.Cols
	for i := 0; i < z.Rows; i++ {
		zi := z.Data[i*z.Stride : i*z.Stride+K]
		hi := h[i*K : (i+1)*K]
		if g == spec.Sigmoid {
			for k, v := range zi {
				hi[k] = sigmoid(v)
			}
			continue
		}
		mx := math.Inf(-1)
		for _, v := range zi {
			mx = math.Max(mx, v)
		}
		s := 0.0
		for k, v := range zi {
			hi[k] = math.Exp(v - mx)
			s += hi[k]
		}
		for k := range hi {
			hi[k] /= s
		}
	}
}

// outputLoss returns the summed loss of the rows with pre-activations z and
// targets t and, when d is non-nil, sets d to ∂loss/∂z (see doc.go):
//
//	sigmoid: loss = Σ_k softplus(z_k) − y_k z_k,   ∂/∂z_k = σ(z_k) − y_k
//	softmax: loss = Σ_k y_k (lse(z) − z_k),        ∂/∂z_k = (Σ_j y_j)·h_k − y_k
//
// With class weights cw (non-nil) the weighted forms of weightedLoss.
func outputLoss(g spec.Activation, d []float64, z, t blas64.General, cw *classWeights) float64 {
	if cw != nil {
		return weightedLoss(g, d, z, t, cw)
	}
	K := z.Cols
	total := 0.0
	for i := 0; i < z.Rows; i++ {
		zi := z.Data[i*z.Stride : i*z.Stride+K]
		yi := t.Data[i*t.Stride : i*t.Stride+K]
		row := 0.0
		if g == spec.Sigmoid {
			for k, v := range zi {
				row += softplus(v) - yi[k]*v
			}
			if d != nil {
				di := d[i*K : (i+1)*K]
				for k, v := range zi {
					di[k] = sigmoid(v) - yi[k]
				}
			}
			total += row
			continue
		}
		lse := logSumExp(zi)
		sy := 0.0
		for k, v := range zi {
			if y := yi[k]; y != 0 {
				row += y * (lse - v)
				sy += y
			}
		}
		if d != nil {
			di := d[i*K : (i+1)*K]
			for k, v := range zi {
				di[k] = sy*math.Exp(v-lse) - yi[k]
			}
		}
		total += row
	}
	return total
}

// logSumExp returns ln Σ_k e^(z_k), computed as max + ln Σ_k e^(z_k − max)
// so that it neither overflows nor loses the largest term.
func logSumExp(z []float64) float64 {
	mx := math.Inf(-1)
	for _, v := range z {
		mx = math.Max(mx, v)
	}
	s := 0.0
	for _, v := range z {
		s += math.Exp(v - mx)
	}
	return mx + math.Log(s)
}

// weightedLoss is outputLoss with class weights (King & Zeng 2001 discuss
// weighting the likelihood of rare events; the balanced weights are common
// practice):
//
//	sigmoid: a_k = pos_k·y_k, b_k = neg_k·(1−y_k),
//	         loss = Σ_k a_k softplus(−z_k) + b_k softplus(z_k)
//	              = Σ_k (a_k+b_k) softplus(z_k) − a_k z_k,
//	         ∂/∂z_k = (a_k+b_k) σ(z_k) − a_k
//	softmax: loss = Σ_k w_k y_k (lse(z) − z_k),
//	         ∂/∂z_k = (Σ_j w_j y_j)·h_k − w_k y_k
//
// Weights of 1 give the unweighted forms.
func weightedLoss(g spec.Activation, d []float64, z, t blas64.General, cw *classWeights) float64 {
	K := z.Cols
	total := 0.0
	for i := 0; i < z.Rows; i++ {
		zi := z.Data[i*z.Stride : i*z.Stride+K]
		yi := t.Data[i*t.Stride : i*t.Stride+K]
		if g == spec.Sigmoid {
			for k, v := range zi {
				a, b := cw.pos[k]*yi[k], cw.neg[k]*(1-yi[k])
				total += (a+b)*softplus(v) - a*v
				if d != nil {
					d[i*K+k] = (a+b)*sigmoid(v) - a
				}
			}
			continue
		}
		lse := logSumExp(zi)
		sy := 0.0
		for k, v := range zi {
			if y := yi[k]; y != 0 {
				wy := cw.w[k] * y
				total += wy * (lse - v)
				sy += wy
			}
		}
		if d != nil {
			di := d[i*K : (i+1)*K]
			for k, v := range zi {
				di[k] = sy*math.Exp(v-lse) - cw.w[k]*yi[k]
			}
		}
	}
	return total
}

// eval sets w.loss to the summed loss of the rows x with targets t and, when
// backward, w.grad to the summed gradient by backpropagation (Rumelhart,
// Hinton & Williams 1986):
//
//	Δ_L = ∂loss/∂Z_L,  ∂W_l = Δ_{l+1}ᵀ·A_l,  ∂b_l = Δ_{l+1}ᵀ·1,
//	Δ_l = (Δ_{l+1}·W_l) ⊙ g′(Z_l).
func (w *work) eval(n *Net, params []float64, x, t blas64.General, backward bool) {
	r := x.Rows
	L := n.NumLayers()
	zL := w.forward(n, params, x)
	if !backward {
		w.loss = outputLoss(n.act[L-1], nil, zL, t, w.cw)
		return
	}
	w.loss = outputLoss(n.act[L-1], w.d[L-1], zL, t, w.cw)
	for l := L - 1; l >= 0; l-- {
		in, out := n.sizes[l], n.sizes[l+1]
		dl := mat64(w.d[l], r, out)
		al := x
		if l > 0 {
			al = mat64(w.a[l-1], r, in)
		}
		gw := w.grad[n.wOff[l] : n.wOff[l]+out*in]
		w.gemm(blas.Trans, blas.NoTrans, 1, dl, al, 0, mat64(gw, out, in))
		gb := w.grad[n.bOff[l] : n.bOff[l]+out]
		copy(gb, dl.Data[:out])
		for i := 1; i < r; i++ {
			row := dl.Data[i*out : (i+1)*out]
			for j, v := range row {
				gb[j] += v
			}
		}
		if l > 0 {
			dp := mat64(w.d[l-1], r, in)
			w.gemm(blas.NoTrans, blas.NoTrans, 1, dl, n.weights(params, l), 0, dp)
			mulDerivative(n.act[l-1], dp.Data, w.z[l-1], w.a[l-1])
		}
	}
}
