package nn_test

import (
	"fmt"
	"log"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// Compile a 2-4-3 net, evaluate its cost at the initial params on four rows,
// and take one gradient step.
func Example() {
	s := &spec.Network{
		Version: 1,
		Inputs:  2,
		Hidden:  []spec.Layer{{Units: 4, Activation: spec.Tanh}},
		Output:  spec.Output{Classes: []string{"low", "mid", "high"}, Activation: spec.Softmax},
		Penalty: spec.Penalty{L2: 0.1},
		Init:    spec.Init{Scheme: spec.GlorotUniform, Seed: 7},
	}
	net, err := nn.Compile(s)
	if err != nil {
		log.Fatal(err)
	}
	x := mat.NewDense(4, 2, []float64{
		-1, -1,
		0, 0.5,
		0.5, 0,
		1, 1,
	})
	y := mat.NewDense(4, 3, []float64{
		1, 0, 0,
		0, 1, 0,
		0, 1, 0,
		0, 0, 1,
	})
	obj, err := nn.NewObjective(net, x, y, nn.ObjectiveOptions{})
	if err != nil {
		log.Fatal(err)
	}
	params := net.NewParams()
	grad := make([]float64, net.NumParams())
	before := obj.Eval(grad, params)
	for i := range params {
		params[i] -= 0.5 * grad[i]
	}
	fmt.Printf("params: %d\n", net.NumParams()) // (2+1)·4 + (4+1)·3
	fmt.Printf("cost at init: %.4g\n", before)
	fmt.Printf("cost after one step: %.4g\n", obj.Eval(nil, params))
	// Output:
	// params: 27
	// cost at init: 1.285
	// cost after one step: 1.033
}

// Predict the class probabilities of one row.
func ExampleNet_ForwardRow() {
	s := &spec.Network{
		Version: 1,
		Inputs:  3,
		Output:  spec.Output{Classes: []string{"no", "yes"}, Activation: spec.Sigmoid},
		Init:    spec.Init{Scheme: spec.Uniform, Scale: 0.1},
	}
	net, err := nn.Compile(s)
	if err != nil {
		log.Fatal(err)
	}
	params := make([]float64, net.NumParams()) // W_0 (1×3) then b_0
	copy(params, []float64{1, -2, 0.5, 0.25})
	ws := net.NewWorkspace(1)
	p := make([]float64, net.Outputs())
	net.ForwardRow(p, ws, params, []float64{0.5, 0.25, 1})
	// z = 0.5 − 0.5 + 0.5 + 0.25 = 0.75; σ(0.75) ≈ 0.6792
	fmt.Printf("P(yes) = %.4g\n", p[0])
	// Output:
	// P(yes) = 0.6792
}
