package optim

import (
	"context"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// leastSquares is the synthetic noisy least-squares problem
//
//	f(w) = (1/2m)·Σ_i (a_iᵀw − y_i)²,   y_i = a_iᵀw_true + 0.5·ε_i,
//
// with a_i and ε_i standard normal from a fixed seed, dealt into batches of
// a fixed size; batch k's cost is the mean over its rows.
type leastSquares struct {
	a     *mat.Dense
	y     []float64
	perm  []int
	batch int
}

func newLeastSquares(m, p, batch int, seed uint64) *leastSquares {
	rnd := rand.New(rand.NewPCG(seed, 11))
	a := mat.NewDense(m, p, nil)
	y := make([]float64, m)
	for i := range m {
		var s float64
		for j := range p {
			v := rnd.NormFloat64()
			a.Set(i, j, v)
			s += v * float64(j+1) // w_true = (1, 2, …, p)
		}
		y[i] = s + 0.5*rnd.NormFloat64()
	}
	perm := make([]int, m)
	for i := range perm {
		perm[i] = i
	}
	return &leastSquares{a: a, y: y, perm: perm, batch: batch}
}

func (l *leastSquares) rows(grad, w []float64, idx []int) float64 {
	clear(grad)
	var f float64
	for _, i := range idx {
		row := l.a.RawRowView(i)
		r := -l.y[i]
		for j, v := range row {
			r += v * w[j]
		}
		f += r * r
		for j, v := range row {
			if grad != nil {
				grad[j] += r * v / float64(len(idx))
			}
		}
	}
	return f / (2 * float64(len(idx)))
}

func (l *leastSquares) Eval(grad, w []float64) float64 { return l.rows(grad, w, l.perm) }
func (l *leastSquares) Batches() int {
	return (len(l.perm) + l.batch - 1) / l.batch
}
func (l *leastSquares) EvalBatch(grad, w []float64, k int) float64 {
	return l.rows(grad, w, l.perm[k*l.batch:min((k+1)*l.batch, len(l.perm))])
}
func (l *leastSquares) Share(k int) float64 {
	return float64(min((k+1)*l.batch, len(l.perm))-k*l.batch) / float64(len(l.perm))
}
func (l *leastSquares) Shuffle(seed uint64) {
	rand.New(rand.NewPCG(seed, 13)).Shuffle(len(l.perm), func(i, j int) { l.perm[i], l.perm[j] = l.perm[j], l.perm[i] })
}

var _ Batched = (*leastSquares)(nil)

// Adam and momentum reach within 1% of the least-squares cost, computed in
// closed form by gonum's mat (QR solve of the overdetermined system).
func TestStochasticLeastSquares(t *testing.T) {
	const m, p = 2000, 5
	l := newLeastSquares(m, p, 50, 1)
	var w mat.VecDense
	require.NoError(t, w.SolveVec(l.a, mat.NewVecDense(m, l.y)))
	best := l.Eval(nil, w.RawVector().Data)
	methods := []struct {
		name string
		m    Method
	}{
		{"Momentum", &Momentum{Rate: 0.01, Decay: 0.5, Seed: 3}},
		{"Nesterov", &Momentum{Rate: 0.01, Decay: 0.5, Nesterov: true, Seed: 3}},
		{"Adam", &Adam{Rate: 0.05, Decay: 0.5, Seed: 3}},
	}
	for _, c := range methods {
		t.Run(c.name, func(t *testing.T) {
			res, err := Minimize(context.Background(), l, make([]float64, p), c.m, Limits{Iterations: 60})
			require.NoError(t, err)
			got := l.Eval(nil, res.X)
			// 1% of the closed-form cost: the noise floor of these rates is
			// far below it.
			assert.InEpsilon(t, best, got, 0.01, "cost against the least-squares cost")
			// One epoch counts one evaluation (the shares sum to 1, up to
			// the rounding of 40 shares of 1/40).
			assert.InEpsilon(t, float64(res.Iterations), res.Evaluations, 1e-9, "evaluations for the epochs")
			t.Logf("cost %.6g vs %.6g (%.2g relative), %v", got, best, (got-best)/best, res.Status)
		})
	}
}

// A plain Objective is one batch of share 1: momentum on the quadratic.
func TestMomentumPlainObjective(t *testing.T) {
	q, xs := newQuadratic(10, 10, 6)
	res, err := Minimize(context.Background(), q, make([]float64, 10), &Momentum{Rate: 0.05}, Limits{Iterations: 2000, GradTol: 1e-10})
	require.NoError(t, err)
	// Heavy ball with ηL = 0.5, β = 0.9 converges linearly on a quadratic
	// (Polyak 1964); ‖g‖ ≤ 1e-10 gives ‖x − x*‖ ≤ 1e-10/λ_min = 1e-10.
	assert.Equal(t, GradConverged, res.Status, "after %d iterations", res.Iterations)
	assert.LessOrEqual(t, relDist(res.X, xs), 1e-9, "‖x − x*‖/‖x*‖")
}
