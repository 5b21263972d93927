package spec_test

import (
	"errors"
	"fmt"
	"os"
	"strings"

	"github.com/seine-ml/seine/spec"
)

func ExampleParse() {
	const src = `
version: 1
name: request-triage
inputs: 12
hidden:
  - units: 32
    activation: tanh
  - units: 16
    activation: relu
output:
  classes: [human, crawler, scraper, stuffer]
penalty:
  l2: 1.0
`
	n, err := spec.Parse(strings.NewReader(src))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("sizes:", n.Sizes())
	fmt.Println("params:", n.ParamCount())
	fmt.Println("output:", n.Output.Activation, "init:", n.Init.Scheme, "seed:", n.Init.Seed)
	// Output:
	// sizes: [12 32 16 4]
	// params: 1012
	// output: softmax init: glorot-uniform seed: 1
}

func ExampleParse_errors() {
	const src = `version: 1
inputs: 12
hidden:
  - units: 32
    activation: tanhh
output:
  classes: [yes, no, yes]
`
	_, err := spec.Parse(strings.NewReader(src))
	fmt.Println(err)
	fmt.Println(errors.Is(err, spec.ErrUnknownName), errors.Is(err, spec.ErrDuplicate))
	// Output:
	// 5:17: hidden[0].activation: unknown activation "tanhh" (want one of sigmoid, tanh, relu, leaky-relu, softplus, identity)
	// 7:22: output.classes[2]: duplicate class name "yes" (also output.classes[0])
	// true true
}

func ExampleNetwork_WriteYAML() {
	n := &spec.Network{
		Version:  1,
		Inputs:   2,
		Features: []string{"bytes", "requests per minute"},
		Output:   spec.Output{Classes: []string{"ok", "bot"}, Activation: spec.Sigmoid},
		Init:     spec.Init{Scheme: spec.HeUniform, Seed: 3},
		Train:    spec.Train{Optimizer: spec.LBFGS, Iterations: 200},
	}
	if err := n.WriteYAML(os.Stdout); err != nil {
		fmt.Println(err)
	}
	// Output:
	// version: 1
	// inputs:
	//   - bytes
	//   - requests per minute
	// output:
	//   classes: [ok, bot]
	//   activation: sigmoid
	// penalty:
	//   l2: 0
	//   l1: 0
	//   bias: false
	// init:
	//   scheme: he-uniform
	//   seed: 3
	// train:
	//   optimizer: lbfgs
	//   iterations: 200
}
