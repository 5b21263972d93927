package nn

import (
	"bytes"
	"encoding/base64"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"testing"
	"testing/fstest"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/spec"
)

// testModel builds a small model with scaling: 3 inputs, one tanh layer of
// 4, softmax over 3 classes, params from the spec's initialisation.
func testModel(t testing.TB, out spec.Activation, classes []string, multilabel bool) *Model {
	t.Helper()
	s := &spec.Network{
		Version: 1, Name: "t", Inputs: 3, Features: []string{"a", "b", "c"},
		Hidden: []spec.Layer{{Units: 4, Activation: spec.Tanh}},
		Output: spec.Output{Classes: classes, Activation: out, Multilabel: multilabel},
		Init:   spec.Init{Scheme: spec.GlorotUniform, Seed: 3},
	}
	net, err := Compile(s)
	require.NoError(t, err)
	p := net.NewParams()
	for i := range p {
		p[i] *= 3 // make the outputs far from uniform
	}
	enc, err := encode.Numbers(s.Features, []float64{1, -2, 0.5}, []float64{2, 0.5, 3})
	require.NoError(t, err)
	m, err := NewModel(s, p, enc, nil)
	require.NoError(t, err)
	return m
}

func rows() [][]float64 {
	return [][]float64{{0, 0, 0}, {1, -2, 0.5}, {3.5, 1e3, -7}, {-1e-3, 2, 9}}
}

func TestModelRoundTripBitIdentical(t *testing.T) {
	for _, m := range []*Model{
		testModel(t, spec.Softmax, []string{"x", "y", "z"}, false),
		testModel(t, spec.Sigmoid, []string{"no", "yes"}, false),
		testModel(t, spec.Sigmoid, []string{"p", "q", "r"}, true),
	} {
		m.summary = Summary{Method: "lbfgs", Iterations: 3, Cost: 0.25, HoldoutCost: math.NaN(), Library: Version}
		var buf bytes.Buffer
		_, err := m.WriteTo(&buf)
		require.NoError(t, err)
		got, err := ReadModel(&buf)
		require.NoError(t, err)
		require.Equal(t, len(m.params), len(got.params))
		for i := range m.params {
			require.Equal(t, math.Float64bits(m.params[i]), math.Float64bits(got.params[i]), "param %d", i)
		}
		assert.True(t, m.Encoder().Equal(got.Encoder()))
		assert.Equal(t, m.classes, got.classes)
		assert.Equal(t, m.features, got.features)
		assert.True(t, math.IsNaN(got.summary.HoldoutCost))
		assert.Equal(t, 0.25, got.summary.Cost)
		for _, x := range rows() {
			a, b := m.Probabilities(nil, x), got.Probabilities(nil, x)
			for k := range a {
				require.Equal(t, math.Float64bits(a[k]), math.Float64bits(b[k]))
			}
		}
	}
}

func TestModelProbabilities(t *testing.T) {
	soft := testModel(t, spec.Softmax, []string{"x", "y", "z"}, false)
	bin := testModel(t, spec.Sigmoid, []string{"no", "yes"}, false)
	for _, x := range rows() {
		p := soft.Probabilities(nil, x)
		assert.InDelta(t, 1, p[0]+p[1]+p[2], 1e-15)
		assert.Equal(t, argmax(p), soft.Predict(x))
		q := bin.Probabilities(nil, x)
		require.Len(t, q, 2)
		assert.InDelta(t, 1, q[0]+q[1], 1e-15)
	}
	// The batch forms agree with the row forms to the last bit: the same
	// forward pass over the same scaled values.
	x := mat.NewDense(4, 3, nil)
	for i, r := range rows() {
		x.SetRow(i, r)
	}
	var pb mat.Dense
	soft.ProbabilitiesBatch(&pb, x)
	pred := soft.PredictBatch(nil, x)
	for i, r := range rows() {
		p := soft.Probabilities(nil, r)
		for k := range p {
			assert.InDelta(t, p[k], pb.At(i, k), 1e-15)
		}
		assert.Equal(t, soft.Predict(r), pred[i])
	}
	ml := testModel(t, spec.Sigmoid, []string{"p", "q", "r"}, true)
	for _, r := range rows() {
		p := ml.Probabilities(nil, r)
		var want []int
		for k, v := range p {
			if v >= 0.5 {
				want = append(want, k)
			}
		}
		assert.Equal(t, want, ml.Labels(nil, r, 0.5))
	}
}

func TestPredictAllocatesNothing(t *testing.T) {
	if raceEnabled {
		t.Skip("sync.Pool drops items on purpose under -race; counted in the ordinary build")
	}
	m := testModel(t, spec.Softmax, []string{"x", "y", "z"}, false)
	x := []float64{1, 2, 3}
	dst := make([]float64, 3)
	m.Predict(x)
	assert.Zero(t, testing.AllocsPerRun(200, func() { m.Predict(x) }), "Predict allocations per call")
	assert.Zero(t, testing.AllocsPerRun(200, func() { m.Probabilities(dst, x) }), "Probabilities allocations per call")
}

// Many goroutines share one model; every answer equals the sequential one.
func TestModelConcurrent(t *testing.T) {
	m := testModel(t, spec.Softmax, []string{"x", "y", "z"}, false)
	want := make([][]float64, len(rows()))
	for i, r := range rows() {
		want[i] = m.Probabilities(nil, r)
	}
	var wg sync.WaitGroup
	errs := make(chan string, 64)
	for g := 0; g < 64; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			dst := make([]float64, 3)
			for n := 0; n < 200; n++ {
				i := (g + n) % len(want)
				m.Probabilities(dst, rows()[i])
				for k := range dst {
					if dst[k] != want[i][k] {
						errs <- "mismatch"
						return
					}
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	assert.Empty(t, errs, "goroutines that got an answer other than the sequential one")
}

func encoded(t *testing.T, m *Model) map[string]any {
	t.Helper()
	var buf bytes.Buffer
	_, err := m.WriteTo(&buf)
	require.NoError(t, err)
	var doc map[string]any
	require.NoError(t, json.Unmarshal(buf.Bytes(), &doc))
	return doc
}

func TestReadModelRejects(t *testing.T) {
	m := testModel(t, spec.Softmax, []string{"x", "y", "z"}, false)
	var good bytes.Buffer
	_, err := m.WriteTo(&good)
	require.NoError(t, err)
	edit := func(f func(doc map[string]any)) string {
		doc := encoded(t, m)
		sum := doc["sha256"]
		f(doc)
		if doc["sha256"] == sum {
			seal(t, doc) // consistent but wrong: not a checksum case
		}
		b, err := json.Marshal(doc)
		require.NoError(t, err)
		return string(b)
	}
	params := func(doc map[string]any) map[string]any { return doc["params"].(map[string]any) }
	input := func(doc map[string]any, i int) map[string]any {
		return doc["encoder"].(map[string]any)["inputs"].([]any)[i].(map[string]any)
	}
	flipped := bytes.Clone(good.Bytes())
	i := bytes.Index(flipped, []byte(`"data": "`)) + 12
	flipped[i] ^= 0x01
	tests := []struct {
		name, in string
		want     error
		msg      string
	}{
		{"empty", "", ErrFormat, ""},
		{"not json", "hello", ErrFormat, "line 1"},
		{"array", "[1,2]", ErrFormat, ""},
		{"truncated", good.String()[:good.Len()/2], ErrFormat, ""},
		{"wrong format", edit(func(d map[string]any) { d["format"] = "other" }), ErrFormat, `"other"`},
		{"future version", edit(func(d map[string]any) { d["version"] = 3 }), ErrVersion, "version 3"},
		{"checksum", edit(func(d map[string]any) { d["sha256"] = strings.Repeat("0", 64) }), ErrChecksum, ""},
		{"flipped byte", string(flipped), ErrChecksum, ""},
		{"count lies", edit(func(d map[string]any) { params(d)["count"] = 7 }), ErrModel, "count 7"},
		{"unknown key", edit(func(d map[string]any) { d["extra"] = 1 }), ErrFormat, "extra"},
		{"duplicate key", strings.Replace(good.String(), `"version": 2,`, `"version": 2, "version": 2,`, 1), ErrFormat, "duplicate key"},
		// Go's decoder matches keys whatever their case; other JSON readers
		// would see "classes" where this one saw "CLASSES" (issue 13).
		{"keys differing in case", strings.Replace(good.String(), `"classes": [`, `"CLASSES": ["p", "q", "r"], "classes": [`, 1), ErrFormat, "CLASSES"},
		{"key in another case", strings.Replace(good.String(), `"classes": [`, `"Classes": [`, 1), ErrFormat, "Classes"},
		{"bad spec", edit(func(d map[string]any) { d["spec"] = "version: 1\ninputs: 0\n" }), ErrModel, "inputs"},
		{"v1 fields in v2", edit(func(d map[string]any) { d["scaler"] = map[string]any{"mean": []float64{1}, "scale": []float64{1}} }), ErrFormat, "encoder"},
		{"zero scale", edit(func(d map[string]any) { input(d, 1)["scale"] = 0 }), ErrModel, "scale"},
		{"negative scale", edit(func(d map[string]any) { input(d, 1)["scale"] = -2 }), ErrModel, "scale"},
		{"encoder disagrees with spec: name", edit(func(d map[string]any) { input(d, 0)["name"] = "other" }), ErrModel, "disagrees"},
		{"encoder disagrees with spec: type", edit(func(d map[string]any) {
			in := input(d, 2)
			in["type"], in["levels"], in["unknown"] = "category", []string{"p", "q"}, "refuse"
			delete(in, "mean")
			delete(in, "scale")
		}), ErrModel, "disagrees"},
		{"encoder fill under refuse", edit(func(d map[string]any) { input(d, 0)["fill"] = 3 }), ErrModel, "refuse"},
		{"encoder unknown rule word", edit(func(d map[string]any) { input(d, 0)["missing"] = "guess" }), ErrModel, "guess"},
		{"classes disagree with the spec", edit(func(d map[string]any) { d["classes"] = []string{"x", "z", "y"} }), ErrModel, "output.classes"},
		{"params that overflow", edit(func(d map[string]any) {
			raw := make([]byte, 8*len(m.params))
			for i := range m.params {
				binary.LittleEndian.PutUint64(raw[8*i:], math.Float64bits(1e308)) // tanh saturates, but the softmax layer's z overflows
			}
			params(d)["data"] = base64.StdEncoding.EncodeToString(raw)
		}), ErrModel, "overflow"},
		{"label is an input", edit(func(d map[string]any) { d["label"] = "b" }), ErrModel, `label column "b"`},
		{"encoder input missing", edit(func(d map[string]any) {
			e := d["encoder"].(map[string]any)
			e["inputs"] = e["inputs"].([]any)[:2]
		}), ErrModel, "2 inputs"},
		{"nested bomb", strings.Repeat("[", 100000) + strings.Repeat("]", 100000), ErrFormat, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ReadModel(strings.NewReader(tt.in))
			require.Error(t, err)
			assert.True(t, errors.Is(err, tt.want), "got %v", err)
			assert.Contains(t, err.Error(), tt.msg)
		})
	}
	_, err = ReadModelLimit(strings.NewReader(good.String()), 100)
	assert.ErrorIs(t, err, ErrTooLarge)
}

func TestSaveAndLoad(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "m.seine.json")
	m := testModel(t, spec.Softmax, []string{"x", "y", "z"}, false)
	require.NoError(t, m.Save(path))
	got, err := Load(path)
	require.NoError(t, err)
	assert.Equal(t, m.params, got.params)
	before, err := os.ReadFile(path)
	require.NoError(t, err)

	// A failed save leaves the old file intact and no temporary file behind.
	bad := &Model{spec: m.spec, params: []float64{1}}
	require.Error(t, bad.Save(path))
	after, err := os.ReadFile(path)
	require.NoError(t, err)
	assert.Equal(t, before, after)
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 1)

	// A folder that does not exist: an error, nothing written.
	assert.Error(t, m.Save(filepath.Join(dir, "missing", "m.json")))

	// Loading from an fs.FS (an embed.FS works the same way).
	fsys := fstest.MapFS{"models/m.seine.json": {Data: before}}
	fm, err := LoadFS(fsys, "models/m.seine.json")
	require.NoError(t, err)
	assert.Equal(t, m.params, fm.params)
	_, err = LoadFS(fsys, "nope.json")
	assert.Error(t, err)
}

// seal recomputes the content digest of an edited model document, so that
// a test can build a file that is consistent but wrong in some other way
// (as a buggy writer would make it). Edits that leave the digest stale are
// the checksum tests.
func seal(t testing.TB, doc map[string]any) {
	t.Helper()
	strs := func(v any) []string {
		if s, ok := v.([]string); ok {
			return s
		}
		l, ok := v.([]any)
		if !ok {
			return nil
		}
		out := make([]string, len(l))
		for i, s := range l {
			out[i], _ = s.(string)
		}
		return out
	}
	nums := func(v any) []float64 {
		if f, ok := v.([]float64); ok {
			return f
		}
		l, _ := v.([]any)
		out := make([]float64, len(l))
		for i, x := range l {
			out[i], _ = x.(float64)
		}
		return out
	}
	raw, err := base64.StdEncoding.DecodeString(doc["params"].(map[string]any)["data"].(string))
	require.NoError(t, err)
	var sc *fileScaler
	if v, ok := doc["scaler"].(map[string]any); ok {
		sc = &fileScaler{Mean: nums(v["mean"]), Scale: nums(v["scale"])}
	}
	spec, _ := doc["spec"].(string)
	if v, _ := doc["version"].(float64); v == 1 {
		doc["sha256"] = digestV1(spec, strs(doc["classes"]), strs(doc["features"]), sc, raw)
		return
	}
	var fe fileEncoder
	if e, ok := doc["encoder"]; ok {
		b, err := json.Marshal(e)
		require.NoError(t, err)
		require.NoError(t, json.Unmarshal(b, &fe))
	}
	label, _ := doc["label"].(string)
	var dec *Decision
	if d, ok := doc["decision"]; ok {
		b, err := json.Marshal(d)
		require.NoError(t, err)
		dec = new(Decision)
		require.NoError(t, json.Unmarshal(b, dec))
	}
	doc["sha256"] = digest(spec, strs(doc["classes"]), label, &fe, dec, raw)
}

// A model file of format version 1 (written by seine 0.1.0, before inputs
// had types: features and a scaler instead of an encoder) still loads, as
// plain number inputs scaled by its scaler, and predicts as the version 2
// file it saves to.
func TestReadModelVersion1(t *testing.T) {
	m, err := Load(filepath.Join("testdata", "v1-triage.seine.json"))
	require.NoError(t, err)
	require.Equal(t, 16, m.Inputs())
	enc := m.Encoder()
	for _, in := range enc.Inputs() {
		assert.Equal(t, spec.NumberInput, in.Type)
		assert.Equal(t, spec.MissingRefuse, in.Missing)
		assert.Greater(t, in.Scale, 0.0)
	}
	var buf bytes.Buffer
	_, err = m.WriteTo(&buf)
	require.NoError(t, err)
	assert.Contains(t, buf.String(), `"version": 2`)
	got, err := ReadModel(&buf)
	require.NoError(t, err)
	x := make([]float64, m.Inputs())
	for i := range x {
		x[i] = enc.Inputs()[i].Mean + 0.5*float64(i%3-1)*enc.Inputs()[i].Scale
	}
	a, b := m.Probabilities(nil, x), got.Probabilities(nil, x)
	for k := range a {
		assert.Equal(t, math.Float64bits(a[k]), math.Float64bits(b[k]))
	}
}

// A writer never produces what its own reader refuses (issue 13): a model
// whose stored spec would pass the spec size limit — here a category with
// 60,000 learned levels, over 1 MiB of YAML though every part is within
// its own limit — is refused by Save before anything is written, and the
// old file stays.
func TestSaveRefusesUnloadable(t *testing.T) {
	const n = 60_000
	levels := make([]string, n)
	for i := range levels {
		levels[i] = fmt.Sprintf("level-number-%06d", i)
	}
	s := &spec.Network{
		Version: 1, Inputs: 1, Features: []string{"c"},
		Types:         []spec.Input{{Type: spec.CategoryInput, Levels: levels}},
		MissingTokens: spec.DefaultMissingTokens,
		Output:        spec.Output{Classes: []string{"a", "b"}, Activation: spec.Softmax},
		Init:          spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
	enc, err := encode.New([]encode.Input{{Name: "c", Type: spec.CategoryInput, Levels: levels, Fill: math.NaN()}}, nil)
	require.NoError(t, err)
	net, err := Compile(s)
	require.NoError(t, err)
	m, err := NewModel(s, net.NewParams(), enc, nil)
	require.NoError(t, err)

	path := filepath.Join(t.TempDir(), "m.seine.json")
	require.NoError(t, os.WriteFile(path, []byte("the old model"), 0o644))
	err = m.Save(path)
	require.ErrorIs(t, err, spec.ErrTooLarge)
	assert.Contains(t, err.Error(), "would not load")
	b, _ := os.ReadFile(path)
	assert.Equal(t, "the old model", string(b))

	// WriteTo makes the same check, and writes nothing.
	var buf bytes.Buffer
	_, err = m.WriteTo(&buf)
	require.ErrorIs(t, err, spec.ErrTooLarge)
	assert.Zero(t, buf.Len())
}

// oneByte is a stream of one byte, forever.
type oneByte byte

func (e oneByte) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = byte(e)
	}
	return len(p), nil
}

// A refused stream costs at most the limit plus one piece of reading
// (issue 13): a model file that starts well and never ends is read in
// 4 MiB pieces up to the limit, then refused. Measured by the bytes
// allocated (runtime.MemStats.TotalAlloc), with 1 MiB for the rest.
func TestRefusedStreamMemory(t *testing.T) {
	const limit = 32 << 20
	r := io.MultiReader(strings.NewReader(`{"format": "`), oneByte('a'))
	var a, b runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&a)
	_, err := ReadModelLimit(r, limit)
	runtime.ReadMemStats(&b)
	require.ErrorIs(t, err, ErrTooLarge)
	alloc := b.TotalAlloc - a.TotalAlloc
	t.Logf("refusing a stream at %d MiB allocated %.1f MiB", limit>>20, float64(alloc)/(1<<20))
	assert.LessOrEqual(t, alloc, uint64(limit+readChunk+1<<20))
}

// A Model that was not built by a constructor cannot predict: the methods
// that return errors say so (wrapping ErrModel), and the float64 methods
// panic with the same message rather than dereference nil (issue 14).
func TestZeroModel(t *testing.T) {
	var m Model
	_, err := m.PredictRecord(map[string]any{})
	assert.ErrorIs(t, err, ErrModel)
	_, err = m.Bind([]string{"a"})
	assert.ErrorIs(t, err, ErrModel)
	_, err = m.ProbabilitiesSet(nil)
	assert.ErrorIs(t, err, ErrModel)
	assert.PanicsWithValue(t, "nn: invalid model: the model was not built: make models with nn.NewModel, nn.Load or train.Train", func() { m.Predict([]float64{1}) })
	assert.ErrorIs(t, m.SetLabel("y"), ErrModel)
	assert.Nil(t, m.Spec())
	assert.Nil(t, m.Params())
	assert.Empty(t, m.Classes())
}

// The accessors hand out copies of what a caller could otherwise change
// under the model (its spec and params), and SetLabel keeps the loader's
// rule that the label column is not an input (issue 14: a model cannot be
// built broken).
func TestModelAccessors(t *testing.T) {
	s := &spec.Network{Version: 1, Inputs: 2, Hidden: []spec.Layer{{Units: 2, Activation: spec.Tanh}},
		Output: spec.Output{Classes: []string{"a", "b"}, Activation: spec.Softmax}, Init: spec.Init{Scheme: spec.GlorotUniform, Seed: 1}}
	net, err := Compile(s)
	require.NoError(t, err)
	m, err := NewModel(s, net.NewParams(), nil, nil)
	require.NoError(t, err)
	x := []float64{0.3, -1.2}
	before := m.Probabilities(nil, x)
	p := m.Params()
	for i := range p {
		p[i] = 2 // were the slice the model's, the probabilities would change
	}
	m.Spec().Output.Classes[0] = "changed"
	assert.Equal(t, before, m.Probabilities(nil, x))
	assert.Equal(t, []string{"a", "b"}, m.Classes())
	assert.Equal(t, []string{"x1", "x2"}, m.Features())

	require.ErrorIs(t, m.SetLabel("x2"), ErrModel)
	assert.Equal(t, "", m.Label())
	require.NoError(t, m.SetLabel("kind"))
	assert.Equal(t, "kind", m.Label())
	m.SetSummary(Summary{Iterations: 7})
	assert.Equal(t, 7, m.Summary().Iterations)
}
