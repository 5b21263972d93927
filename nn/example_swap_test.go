package nn_test

import (
	"fmt"
	"log"
	"os"
	"path/filepath"
	"sync/atomic"

	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// classifier serves queries from the model that is current at the time of
// each query; reload swaps in a fresh one without stopping the queries.
type classifier struct {
	model atomic.Pointer[nn.Model]
	path  string
}

// reload reads the model file again. On any error the current model stays
// in service and the error is returned for logging.
func (c *classifier) reload() error {
	m, err := nn.Load(c.path)
	if err != nil {
		return err
	}
	c.model.Store(m) // queries already running finish with the old model
	return nil
}

// classify loads the pointer once per query, so one query never mixes two
// models; Model's methods are safe for concurrent use.
func (c *classifier) classify(x []float64) string {
	m := c.model.Load()
	return m.Classes()[m.Predict(x)]
}

// Hot-swap a model in a running service: load the model file that a nightly
// retraining writes with Model.Save, and swap it in through an
// atomic.Pointer. A file that is missing or damaged leaves the last good
// model in service. Save replaces the file by rename, so a reader sees the
// old file or the new one, never a partial one.
func Example_hotSwap() {
	dir, err := os.MkdirTemp("", "seine-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "risk.seine.json")

	// A one-feature model: a positive weight makes large x "high".
	s := &spec.Network{
		Version: 1, Inputs: 1, Features: []string{"x"},
		Output: spec.Output{Classes: []string{"low", "high"}, Activation: spec.Softmax},
		Init:   spec.Init{Scheme: spec.GlorotUniform},
	}
	save := func(w float64) {
		// params: the 2×1 weight block, then the 2 biases.
		m, err := nn.NewModel(s, []float64{-w, w, 0, 0}, nil, nil)
		if err != nil {
			log.Fatal(err)
		}
		if err := m.Save(path); err != nil {
			log.Fatal(err)
		}
	}

	save(1)
	c := &classifier{path: path}
	if err := c.reload(); err != nil {
		log.Fatal(err)
	}
	fmt.Println("x=2:", c.classify([]float64{2}))

	save(-1) // retrained: the weight changed sign
	if err := c.reload(); err != nil {
		log.Fatal(err)
	}
	fmt.Println("x=2 after reload:", c.classify([]float64{2}))

	// A damaged file is refused and the last good model keeps answering.
	if err := os.WriteFile(path, []byte(`{"format": "seine-model", "vers`), 0o644); err != nil {
		log.Fatal(err)
	}
	if err := c.reload(); err != nil {
		fmt.Println("reload refused:", err != nil)
	}
	fmt.Println("x=2 still:", c.classify([]float64{2}))
	// Output:
	// x=2: high
	// x=2 after reload: low
	// reload refused: true
	// x=2 still: low
}
