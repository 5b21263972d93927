package optim

import (
	"context"
	"fmt"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/optimize"
)

func TestGonum(t *testing.T) {
	x0 := []float64{-1.2, 1}
	minima := mghProblems()[0].minima
	for _, c := range []struct {
		name string
		m    optimize.Method
		tol  float64
	}{
		{"default", nil, 1e-6},
		{"BFGS", &optimize.BFGS{}, 1e-6},
		{"CG", &optimize.CG{}, 1e-6},
		// Nelder–Mead uses no gradient; it stops on its own simplex test
		// (gonum's default) well before 1e-6 in x, so only the cost is asked.
		{"NelderMead", &optimize.NelderMead{}, 1e-6},
	} {
		t.Run(c.name, func(t *testing.T) {
			cnt := &counted{Objective: rosen()}
			res, err := Minimize(context.Background(), cnt, x0, &Gonum{Method: c.m}, mghLimits)
			require.NoError(t, err)
			// Source: Moré, Garbow & Hillstrom (1981) via gonum optimize/functions.
			_, ok := reached(res.X, res.Cost, minima, c.tol)
			assert.True(t, ok, "f = %.3g, %v: want a listed minimum within %g", res.Cost, res.Status, c.tol)
			assert.Equal(t, float64(cnt.calls), res.Evaluations, "calls of the objective against evaluations counted")
			t.Logf("%v, %d iterations, %g evaluations, f = %.3g", res.Status, res.Iterations, res.Evaluations, res.Cost)
		})
	}
	t.Run("cancel and limits", func(t *testing.T) {
		ctx, cancel := context.WithCancel(context.Background())
		defer cancel()
		res, err := Minimize(ctx, rosen(), x0, &Gonum{Method: &optimize.BFGS{}},
			Limits{Observer: func(s Step, _ []float64) bool {
				if s.Iter == 3 {
					cancel()
				}
				return false
			}})
		assert.ErrorIs(t, err, context.Canceled)
		assert.Equal(t, Cancelled, res.Status)
		assert.Equal(t, 3, res.Iterations)
		cnt := &counted{Objective: rosen()}
		res, err = Minimize(context.Background(), cnt, x0, &Gonum{}, Limits{Evaluations: 20})
		require.NoError(t, err)
		assert.Equal(t, EvaluationLimit, res.Status)
		assert.Equal(t, 20, cnt.calls, "calls of the objective")
	})
}

// TestMGHTable prints the evaluation counts of benchmarks/README.md:
//
//	SEINE_MGH_TABLE=1 go test ./optim -run TestMGHTable -v
func TestMGHTable(t *testing.T) {
	if os.Getenv("SEINE_MGH_TABLE") == "" {
		t.Skip("set SEINE_MGH_TABLE=1 to print the table")
	}
	type col struct {
		name string
		new  func() Method
		lim  Limits
	}
	gdLim := mghLimits
	gdLim.Evaluations = 100000
	gdLim.Iterations = 100000
	cols := []col{
		{"CG (ours)", func() Method { return &ConjugateGradient{} }, mghLimits},
		{"CG, HS (ours)", func() Method { return &ConjugateGradient{Formula: HestenesStiefel} }, mghLimits},
		{"L-BFGS (ours)", func() Method { return &LBFGS{} }, mghLimits},
		{"GD (ours)", func() Method { return &GradientDescent{} }, gdLim},
		{"optimize.CG", func() Method { return &Gonum{Method: &optimize.CG{}} }, mghLimits},
		{"optimize.LBFGS", func() Method { return &Gonum{Method: &optimize.LBFGS{}} }, mghLimits},
	}
	var b strings.Builder
	b.WriteString("| function | n |")
	for _, c := range cols {
		b.WriteString(" " + c.name + " |")
	}
	b.WriteString("\n| --- | --- |" + strings.Repeat(" --- |", len(cols)) + "\n")
	for _, p := range mghProblems() {
		fmt.Fprintf(&b, "| %s | %d |", p.name, len(p.x0))
		for _, c := range cols {
			res, err := Minimize(context.Background(), p.obj, p.x0, c.new(), c.lim)
			_, ok := reached(res.X, res.Cost, p.minima, 1e-6)
			switch {
			case err != nil:
				fmt.Fprintf(&b, " error %v |", err)
			case ok:
				fmt.Fprintf(&b, " %g |", res.Evaluations)
			default:
				fmt.Fprintf(&b, " (%g, f = %.2g, %v) |", res.Evaluations, res.Cost, res.Status)
			}
		}
		b.WriteString("\n")
	}
	fmt.Print(b.String())
}
