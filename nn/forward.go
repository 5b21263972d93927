package nn

import (
	"fmt"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// Workspace holds the buffers of Forward and ForwardRow for one net. A
// Workspace is not safe for concurrent use: give each goroutine its own.
// The Net and params may be shared.
type Workspace struct {
	sizes []int
	w     *work
	in    []float64 // x copied here when it exposes no raw row-major data
	out   mat.Dense // view returned by Forward
}

// NewWorkspace returns buffers for forward passes of up to rows rows
// (at least 1). Forward grows them when given more rows.
func (n *Net) NewWorkspace(rows int) *Workspace {
	return &Workspace{sizes: n.sizes, w: newWork(n, rows, false)}
}

func (n *Net) checkWorkspace(ws *Workspace) {
	if len(ws.sizes) != len(n.sizes) {
		panic("nn: workspace belongs to a net of another shape")
	}
	for i, s := range ws.sizes {
		if s != n.sizes[i] {
			panic("nn: workspace belongs to a net of another shape")
		}
	}
}

// Forward returns the output probabilities h(x) of the rows of x
// (rows × Inputs): rows × Outputs, each row σ(z_L) per unit for a sigmoid
// output or softmax(z_L) for a softmax output. The result is a view into ws,
// valid until the next call with ws. Forward allocates nothing when x is a
// *mat.Dense (or another mat.RawMatrixer) and ws has room for its rows.
// It panics if x does not have Inputs columns or params has the wrong
// length.
func (n *Net) Forward(ws *Workspace, params []float64, x mat.Matrix) *mat.Dense {
	n.checkParams(params)
	n.checkWorkspace(ws)
	r, c := x.Dims()
	if c != n.Inputs() {
		panic(fmt.Sprintf("nn: Forward: x has %d columns, net has %d inputs", c, n.Inputs()))
	}
	if r > ws.w.rows {
		ws.w = newWork(n, r, false)
	}
	var xg blas64.General
	if rm, ok := x.(mat.RawMatrixer); ok {
		xg = rm.RawMatrix()
	} else {
		if len(ws.in) < r*c {
			ws.in = make([]float64, r*c)
		}
		xg = mat64(ws.in, r, c)
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				xg.Data[i*c+j] = x.At(i, j)
			}
		}
	}
	L := n.NumLayers()
	zL := ws.w.forward(n, params, xg)
	h := mat64(ws.w.a[L-1], r, n.Outputs())
	probabilities(n.act[L-1], h.Data, zL)
	ws.out.SetRawMatrix(h)
	return &ws.out
}

// ForwardRow writes the output probabilities of the single row x (length
// Inputs) into dst (length Outputs). It allocates nothing. It panics on a
// length mismatch.
func (n *Net) ForwardRow(dst []float64, ws *Workspace, params []float64, x []float64) {
	n.checkParams(params)
	n.checkWorkspace(ws)
	if len(x) != n.Inputs() || len(dst) != n.Outputs() {
		panic(fmt.Sprintf("nn: ForwardRow: x has length %d and dst %d, want %d and %d", len(x), len(dst), n.Inputs(), n.Outputs()))
	}
	zL := ws.w.forward(n, params, mat64(x, 1, len(x)))
	probabilities(n.act[n.NumLayers()-1], dst, zL)
}

// Logits returns the output pre-activations z_L of the rows of x, before
// the output activation (as Forward returns h = σ(z_L) or softmax(z_L)):
// rows × Outputs, a view into ws valid until the next call with ws. It is
// what temperature scaling divides. It allocates nothing under the same
// conditions as Forward and panics as Forward does.
func (n *Net) Logits(ws *Workspace, params []float64, x *mat.Dense) *mat.Dense {
	n.checkParams(params)
	n.checkWorkspace(ws)
	r, c := x.Dims()
	if c != n.Inputs() {
		panic(fmt.Sprintf("nn: Logits: x has %d columns, net has %d inputs", c, n.Inputs()))
	}
	if r > ws.w.rows {
		ws.w = newWork(n, r, false)
	}
	zL := ws.w.forward(n, params, x.RawMatrix())
	ws.out.SetRawMatrix(zL)
	return &ws.out
}
