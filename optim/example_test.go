package optim_test

import (
	"context"
	"fmt"
	"math"

	"github.com/seine-ml/seine/optim"
)

// Minimise your own function: here f(x) = (x₀ − 3)² + 10·(x₁ + 1)⁴ + x₀x₁,
// written with its gradient. At the minimum 2(x₀ − 3) + x₁ = 0 and
// 40(x₁ + 1)³ + x₀ = 0, which the printed point satisfies to its 4 digits.
func ExampleMinimize() {
	f := optim.Func(func(grad, x []float64) float64 {
		a, b := x[0]-3, x[1]+1
		if grad != nil {
			grad[0] = 2*a + x[1]
			grad[1] = 40*b*b*b + x[0]
		}
		return a*a + 10*b*b*b*b + x[0]*x[1]
	})
	res, err := optim.Minimize(context.Background(), f, []float64{0, 0}, &optim.LBFGS{}, optim.Limits{GradTol: 1e-10})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("x = (%.4g, %.4g), f = %.4g, %v\n", res.X[0], res.X[1], res.Cost, res.Status)
	fmt.Printf("gradient norm below 1e-9: %v\n", res.GradNorm < 1e-9 && !math.IsNaN(res.GradNorm))
	// Output:
	// x = (3.727, -1.453), f = -4.466, GradConverged
	// gradient norm below 1e-9: true
}

// Check a hand-written gradient against central finite differences.
func ExampleCheckGradient() {
	f := optim.Func(func(grad, x []float64) float64 {
		if grad != nil {
			grad[0] = math.Cos(x[0]) * x[1]
			grad[1] = math.Sin(x[0])
		}
		return math.Sin(x[0]) * x[1]
	})
	gc, err := optim.CheckGradient(f, []float64{0.5, 2}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("largest relative error below 1e-8: %v\n", gc.MaxRelErr < 1e-8)
	// Output:
	// largest relative error below 1e-8: true
}
