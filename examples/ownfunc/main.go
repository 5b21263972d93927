// Command ownfunc minimises a function of your own with two methods of
// package optim and prints a comparison of evaluations, cost and time.
//
// The function is a least-squares curve fit on SYNTHETIC data: 200 points
// of y = a·exp(−b·t) + c with a = 2, b = 1.3, c = 0.5 plus Gaussian noise
// (σ = 0.05) from a fixed seed. The cost is
//
//	f(a, b, c) = (1/2m)·Σ_i (a·exp(−b·t_i) + c − y_i)²
//
// Run it with: go run ./examples/ownfunc
package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"text/tabwriter"

	"github.com/seine-ml/seine/optim"
)

// curveFit is the cost and gradient of the synthetic fit.
type curveFit struct {
	t, y []float64
}

func newCurveFit(m int, seed uint64) curveFit {
	rnd := rand.New(rand.NewPCG(seed, 1))
	t, y := make([]float64, m), make([]float64, m)
	for i := range m {
		t[i] = 4 * float64(i) / float64(m-1)
		y[i] = 2*math.Exp(-1.3*t[i]) + 0.5 + 0.05*rnd.NormFloat64()
	}
	return curveFit{t, y}
}

// Eval implements optim.Objective.
func (c curveFit) Eval(grad, p []float64) float64 {
	a, b, off := p[0], p[1], p[2]
	var f, ga, gb, gc float64
	for i, t := range c.t {
		e := math.Exp(-b * t)
		r := a*e + off - c.y[i]
		f += r * r
		ga += r * e
		gb += -r * a * t * e
		gc += r
	}
	m := float64(len(c.t))
	if grad != nil {
		grad[0], grad[1], grad[2] = ga/m, gb/m, gc/m
	}
	return f / (2 * m)
}

var _ optim.Objective = curveFit{}

// run fits the curve with each method and writes the comparison to w.
func run(w io.Writer) error {
	fit := newCurveFit(200, 42)
	x0 := []float64{1, 1, 0}
	methods := []struct {
		name string
		m    optim.Method
	}{
		{"lbfgs", &optim.LBFGS{}},
		{"cg", &optim.ConjugateGradient{}},
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "method\tstatus\titerations\tevaluations\tcost\ta\tb\tc\ttime")
	for _, mm := range methods {
		res, err := optim.Minimize(context.Background(), fit, x0, mm.m, optim.Limits{GradTol: 1e-10})
		if err != nil {
			return fmt.Errorf("%s: %w", mm.name, err)
		}
		fmt.Fprintf(tw, "%s\t%v\t%d\t%g\t%.6g\t%.4g\t%.4g\t%.4g\t%v\n", mm.name, res.Status, res.Iterations,
			res.Evaluations, res.Cost, res.X[0], res.X[1], res.X[2], res.Elapsed.Round(1000))
	}
	return tw.Flush()
}

func main() {
	fmt.Println("Synthetic curve fit y = a·exp(−b·t) + c (data generated with a = 2, b = 1.3, c = 0.5)")
	if err := run(os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
}
