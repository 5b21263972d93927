package nn_test

import (
	"errors"
	"fmt"
	"math"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// Predict from raw records: by name (as decoded from JSON), and from rows
// in a column order bound once (the zero-allocation path). The model here
// is built by hand — a logistic unit over a scaled number and a one-hot
// category — where a service would load one with nn.Load or nn.LoadFS.
func ExampleModel_PredictRecord() {
	s := &spec.Network{
		Version: 1, Inputs: 2, Features: []string{"amount", "channel"},
		Types:         []spec.Input{{}, {Type: spec.CategoryInput, Levels: []string{"app", "web"}, Unknown: spec.UnknownIgnore}},
		MissingTokens: spec.DefaultMissingTokens,
		Output:        spec.Output{Classes: []string{"ok", "review"}, Activation: spec.Sigmoid},
		Init:          spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
	enc, err := encode.New([]encode.Input{
		{Name: "amount", Mean: 100, Scale: 50, Fill: math.NaN()},
		{Name: "channel", Type: spec.CategoryInput, Levels: []string{"app", "web"}, Unknown: spec.UnknownIgnore, Fill: math.NaN()},
	}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	// z = 2·(amount − 100)/50 + 1·[web] − 1
	m, err := nn.NewModel(s, []float64{2, 0, 1, -1}, enc, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	k, err := m.PredictRecord(map[string]any{"amount": 180.0, "channel": "web"})
	fmt.Println(m.Classes()[k], err)
	_, err = m.PredictRecord(map[string]any{"amount": nil, "channel": "web"})
	var fe *encode.FieldError
	fmt.Println(errors.As(err, &fe), fe.Field, errors.Is(err, encode.ErrMissingValue))

	b, err := m.Bind([]string{"channel", "amount"})
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := b.Probabilities(nil, []encode.Value{encode.Text("kiosk"), encode.Number(100)})
	fmt.Printf("%.4f %.4f %v\n", p[0], p[1], err) // an unknown channel is ignored: σ(−1)
	// Output:
	// review <nil>
	// true amount true
	// 0.7311 0.2689 <nil>
}
