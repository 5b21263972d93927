package nn

import (
	"encoding/base64"
	"encoding/binary"
	"encoding/json"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/spec"
)

var updateCatalogue = flag.Bool("update-catalogue", false, "rewrite the model files of testdata/bad made by TestCatalogueModels")

// catalogueModels are the model files of the repository's bad-input
// catalogue (testdata/bad) that issue 13 added: each is a version 2 file
// of the catalogue's spec (ok.yaml: 4 inputs, 3 tanh units, 3 classes)
// with one contradiction, sealed with a recomputed checksum where the
// case is not about the checksum. TestCatalogueModels checks that the
// committed files are what this makes; run it with -update-catalogue to
// rewrite them.
func catalogueModels(t *testing.T) map[string][]byte {
	s, err := spec.Parse(strings.NewReader("version: 1\nname: catalogue\ninputs: [sepal_length, sepal_width, petal_length, petal_width]\nhidden:\n  - units: 3\n    activation: tanh\noutput:\n  classes: [setosa, versicolor, virginica]\ninit:\n  seed: 1\n"))
	require.NoError(t, err)
	net, err := Compile(s)
	require.NoError(t, err)
	p := net.NewParams()
	enc, err := encode.Numbers(s.Features, []float64{5.8, 3.0, 3.8, 1.2}, []float64{0.8, 0.4, 1.8, 0.8})
	require.NoError(t, err)
	m, err := NewModel(s, p, enc, nil)
	require.NoError(t, err)
	m.label = "species"
	input := func(d map[string]any, i int) map[string]any {
		return d["encoder"].(map[string]any)["inputs"].([]any)[i].(map[string]any)
	}
	out := map[string][]byte{}
	mk := func(name string, f func(d map[string]any), reseal bool) {
		d := encoded(t, m)
		f(d)
		if reseal {
			seal(t, d)
		}
		b, err := json.MarshalIndent(d, "", "  ")
		require.NoError(t, err)
		out[name] = append(b, '\n')
	}
	mk("model_v2_future_version.seine.json", func(d map[string]any) { d["version"] = 3 }, true)
	mk("model_v2_classes_disagree.seine.json", func(d map[string]any) { d["classes"] = []string{"setosa", "virginica", "versicolor"} }, true)
	mk("model_v2_label_is_input.seine.json", func(d map[string]any) { d["label"] = "petal_width" }, true)
	mk("model_v2_encoder_disagrees.seine.json", func(d map[string]any) { input(d, 2)["name"] = "petal_len" }, true)
	mk("model_v2_negative_scale.seine.json", func(d map[string]any) { input(d, 1)["scale"] = -0.4 }, true)
	mk("model_v2_overflow.seine.json", func(d map[string]any) {
		raw := make([]byte, 8*len(p))
		for i := range p {
			binary.LittleEndian.PutUint64(raw[8*i:], math.Float64bits(1e308))
		}
		d["params"].(map[string]any)["data"] = base64.StdEncoding.EncodeToString(raw)
	}, true)
	// Keys that differ only in letter case: Go's decoder would read the
	// second "classes"; other JSON readers the first.
	d := encoded(t, m)
	b, err := json.MarshalIndent(d, "", "  ")
	require.NoError(t, err)
	out["model_v2_case_keys.seine.json"] = []byte(strings.Replace(string(b), `"classes": [`, `"CLASSES": ["virginica", "setosa", "versicolor"], "classes": [`, 1) + "\n")
	return out
}

func TestCatalogueModels(t *testing.T) {
	dir := filepath.Join("..", "testdata", "bad")
	for name, want := range catalogueModels(t) {
		path := filepath.Join(dir, name)
		if *updateCatalogue {
			require.NoError(t, os.WriteFile(path, want, 0o644))
			continue
		}
		got, err := os.ReadFile(path)
		require.NoError(t, err, "run go test ./nn -run TestCatalogueModels -update-catalogue")
		require.Equal(t, string(want), string(got), "%s is stale: run go test ./nn -run TestCatalogueModels -update-catalogue", name)
		_, err = ReadModel(strings.NewReader(string(got)))
		require.Error(t, err, "%s must be refused", name)
	}
}
