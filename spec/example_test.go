package spec_test

import (
	"errors"
	"fmt"
	"os"
	"strconv"
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

func ExampleParse_typedInputs() {
	const src = `
version: 1
inputs:
  - req_per_min
  - name: plan
    type: category
    levels: [basic, pro, team]
  - name: tenure
    missing: median
  - name: region
    type: category
    missing: level
    unknown: ignore
hidden:
  - units: 8
    activation: relu
output:
  classes: [stays, leaves]
  activation: sigmoid
train:
  class_weights: {leaves: 20}
`
	n, err := spec.Parse(strings.NewReader(src))
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, name := range n.Features {
		in := n.Input(i)
		fmt.Printf("%-11s %-8v levels=%v missing=%v units=%d\n", name, in.Type, in.Levels, in.Missing, in.Units())
	}
	// region's levels are learned when the encoder is fitted, so the
	// input width is not known yet; Sizes counts one unit for it.
	fmt.Println("resolved:", n.Resolved(), "sizes (lower bound):", n.Sizes())
	fmt.Println("missing tokens:", strconv.Quote(strings.Join(n.MissingTokens, "|")))
	fmt.Println("class weights:", n.Train.ClassWeights.By)
	// Output:
	// req_per_min number   levels=[] missing=refuse units=1
	// plan        category levels=[basic pro team] missing=refuse units=3
	// tenure      number   levels=[] missing=median units=1
	// region      category levels=[] missing=level units=0
	// resolved: false sizes (lower bound): [6 8 1]
	// missing tokens: "|?|NA"
	// class weights: map[leaves:20]
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
