package onnx_test

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"log"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"google.golang.org/protobuf/proto"

	"github.com/seine-ml/seine/encode"
	pb "github.com/seine-ml/seine/internal/onnxpb"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/onnx"
	"github.com/seine-ml/seine/spec"
)

// handModel is a 2-3-3 net with hand-set params: W_0 = [[1 2][3 4][5 6]],
// b_0 = [0.1 0.2 0.3], and so on, counting up by 1 (0.1 for biases).
func handModel(t testing.TB) *nn.Model {
	s := &spec.Network{
		Version: 1, Name: "hand", Inputs: 2, Features: []string{"u", "v"},
		Hidden: []spec.Layer{{Units: 3, Activation: spec.Softplus}},
		Output: spec.Output{Classes: []string{"low", "mid", "high"}, Activation: spec.Softmax},
		Init:   spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
	params := []float64{1, 2, 3, 4, 5, 6, 0.1, 0.2, 0.3, 7, 8, 9, 10, 11, 12, 13, 14, 15, 0.4, 0.5, 0.6}
	enc, err := encode.Numbers(s.Features, []float64{1, 2}, []float64{0.5, 4})
	require.NoError(t, err)
	m, err := nn.NewModel(s, params, enc, nil)
	require.NoError(t, err)
	return m
}

// tailModel is x → g(x) → σ(10¹⁵·g(x)) with one hidden unit of
// activation g: for x near −35, g(x) = e^x (softplus, sigmoid) is about
// 10⁻¹⁵, so the output sees g's relative error (times |z| ≈ 1) where an
// ordinary layer would see only its absolute error, about 10⁻³¹. A
// softplus taken as ln(1 + e^x), or a sigmoid accurate only to ulp(1),
// changes the probabilities here by far more than 1e-12.
func tailModel(t testing.TB, g spec.Activation) *nn.Model {
	s := &spec.Network{
		Version: 1, Name: "tail-" + g.String(), Inputs: 1, Features: []string{"x"},
		Hidden: []spec.Layer{{Units: 1, Activation: g}},
		Output: spec.Output{Classes: []string{"no", "yes"}, Activation: spec.Sigmoid},
		Init:   spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
	m, err := nn.NewModel(s, []float64{1, 0, 1e15, -0.5}, nil, nil)
	require.NoError(t, err)
	return m
}

// decode writes m and reads the bytes back with the generated types.
func decode(t *testing.T, m *nn.Model, opt onnx.Options) *pb.ModelProto {
	t.Helper()
	var buf bytes.Buffer
	require.NoError(t, onnx.Write(&buf, m, opt))
	var mp pb.ModelProto
	require.NoError(t, proto.Unmarshal(buf.Bytes(), &mp))
	return &mp
}

func metadata(mp *pb.ModelProto) map[string]string {
	out := map[string]string{}
	for _, e := range mp.GetMetadataProps() {
		out[e.GetKey()] = e.GetValue()
	}
	return out
}

// TestWriteContract checks the parts of the written model that the package
// doc promises, read back with the types generated from onnx.proto.
func TestWriteContract(t *testing.T) {
	m := handModel(t)
	mp := decode(t, m, onnx.Options{})
	assert.Equal(t, int64(8), mp.GetIrVersion())
	require.Len(t, mp.GetOpsetImport(), 1)
	assert.Equal(t, "", mp.GetOpsetImport()[0].GetDomain())
	assert.Equal(t, int64(onnx.DefaultOpset), mp.GetOpsetImport()[0].GetVersion())
	assert.Equal(t, "seine", mp.GetProducerName())

	g := mp.GetGraph()
	require.Len(t, g.GetInput(), 1)
	in := g.GetInput()[0]
	assert.Equal(t, "numbers", in.GetName())
	tt := in.GetType().GetTensorType()
	assert.Equal(t, int32(pb.TensorProto_DOUBLE), tt.GetElemType())
	require.Len(t, tt.GetShape().GetDim(), 2)
	assert.Equal(t, "N", tt.GetShape().GetDim()[0].GetDimParam())
	assert.Equal(t, int64(2), tt.GetShape().GetDim()[1].GetDimValue())

	require.Len(t, g.GetOutput(), 2)
	assert.Equal(t, "probabilities", g.GetOutput()[0].GetName())
	assert.Equal(t, int32(pb.TensorProto_DOUBLE), g.GetOutput()[0].GetType().GetTensorType().GetElemType())
	assert.Equal(t, "label", g.GetOutput()[1].GetName())
	assert.Equal(t, int32(pb.TensorProto_INT64), g.GetOutput()[1].GetType().GetTensorType().GetElemType())

	// The weights are stored bit for bit: W1 holds params[0:6] as 3 × 2
	// (units out × units in, row-major, the layout of nn/doc.go).
	var w1, scale []float64
	var w1Dims []int64
	for _, init := range g.GetInitializer() {
		switch init.GetName() {
		case "W1":
			w1, w1Dims = raw(t, init), init.GetDims()
		case "scale":
			scale = raw(t, init)
		}
	}
	assert.Equal(t, []int64{3, 2}, w1Dims)
	assert.Equal(t, m.Params()[:6], w1)
	assert.Equal(t, []float64{0.5, 4}, scale)

	// No operator the WebAssembly runtime lacks a float64 kernel for, and
	// nothing cast to float32.
	for _, n := range g.GetNode() {
		assert.NotContains(t, []string{"Softplus", "LeakyRelu", "Sigmoid"}, n.GetOpType(), "node %s", n.GetName())
		if n.GetOpType() == "Cast" {
			for _, a := range n.GetAttribute() {
				assert.Equal(t, int64(pb.TensorProto_DOUBLE), a.GetI(), "node %s casts to %d", n.GetName(), a.GetI())
			}
		}
	}

	md := metadata(mp)
	assert.Equal(t, `["low","mid","high"]`, md["classes"])
	assert.Equal(t, "hand", md["spec_name"])
	assert.Equal(t, nn.Version, md["seine_version"])
	assert.Equal(t, `["u","v"]`, md["number_inputs"])
	assert.Equal(t, `[]`, md["category_inputs"])

	// The digest is the one the saved model file carries.
	path := filepath.Join(t.TempDir(), "hand.seine.json")
	require.NoError(t, m.Save(path))
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	var f struct{ SHA256 string }
	require.NoError(t, json.Unmarshal(b, &f))
	assert.Len(t, md["model_sha256"], 64)
	assert.Equal(t, f.SHA256, md["model_sha256"])
}

func raw(t *testing.T, tp *pb.TensorProto) []float64 {
	t.Helper()
	require.Equal(t, int32(pb.TensorProto_DOUBLE), tp.GetDataType())
	b := tp.GetRawData()
	v := make([]float64, len(b)/8)
	for i := range v {
		v[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return v
}

// TestWriteDeterministic: the same model gives the same bytes.
func TestWriteDeterministic(t *testing.T) {
	m := handModel(t)
	var a, b bytes.Buffer
	require.NoError(t, onnx.Write(&a, m, onnx.Options{}))
	require.NoError(t, onnx.Write(&b, m, onnx.Options{}))
	assert.Equal(t, a.Bytes(), b.Bytes())
}

func TestOpset(t *testing.T) {
	m := handModel(t)
	for _, v := range []int{13, 15, 17} {
		mp := decode(t, m, onnx.Options{Opset: v})
		assert.Equal(t, int64(v), mp.GetOpsetImport()[0].GetVersion())
	}
	for _, v := range []int{-1, 12, 18} {
		var buf bytes.Buffer
		err := onnx.Write(&buf, m, onnx.Options{Opset: v})
		require.ErrorIs(t, err, onnx.ErrOptions, "opset %d", v)
		assert.Contains(t, err.Error(), fmt.Sprint(v))
		assert.Zero(t, buf.Len(), "opset %d: nothing may be written", v)
	}
}

// categoryModel is a model whose one category input has the given name.
func categoryModel(t *testing.T, name string, withNumber bool) *nn.Model {
	t.Helper()
	ins := []encode.Input{{Name: name, Type: spec.CategoryInput, Levels: []string{"a", "b"}, Missing: spec.MissingLevel, Fill: math.NaN()}}
	types := []spec.Input{{Type: spec.CategoryInput, Levels: []string{"a", "b"}, Missing: spec.MissingLevel}}
	features := []string{name}
	if withNumber {
		ins = append(ins, encode.Input{Name: "x", Fill: math.NaN(), Scale: 1})
		types = append(types, spec.Input{Type: spec.NumberInput})
		features = append(features, "x")
	}
	enc, err := encode.New(ins, nil)
	require.NoError(t, err)
	s := &spec.Network{
		Version: 1, Inputs: len(ins), Features: features, Types: types, MissingTokens: spec.DefaultMissingTokens,
		Output: spec.Output{Classes: []string{"no", "yes"}, Activation: spec.Sigmoid},
		Init:   spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
	net, err := nn.Compile(s)
	require.NoError(t, err, "spec")
	m, err := nn.NewModel(s, make([]float64, net.NumParams()), enc, nil)
	require.NoError(t, err)
	return m
}

// TestRefuse: what cannot be exported is refused, naming the feature, and
// nothing is written.
func TestRefuse(t *testing.T) {
	for _, tc := range []struct {
		input      string
		withNumber bool
	}{{"label", false}, {"probabilities", true}, {"numbers", true}} {
		m := categoryModel(t, tc.input, tc.withNumber)
		err := onnx.Check(m)
		require.ErrorIs(t, err, onnx.ErrUnsupported, tc.input)
		assert.Contains(t, err.Error(), `category input "`+tc.input+`"`)
		var buf bytes.Buffer
		require.ErrorIs(t, onnx.Write(&buf, m, onnx.Options{}), onnx.ErrUnsupported)
		assert.Zero(t, buf.Len())
	}
	// Without number inputs the graph has no numbers tensor, so the name
	// is free.
	require.NoError(t, onnx.Check(categoryModel(t, "numbers", false)))
	require.NoError(t, onnx.Check(handModel(t)))
	require.ErrorIs(t, onnx.Check(nil), onnx.ErrUnsupported)
	require.ErrorIs(t, onnx.Check(&nn.Model{}), onnx.ErrUnsupported)
}

// TestCategoryGraph checks the pool and the map of a category input with
// missing: level: levels first, then the missing tokens, which all go to
// the extra unit.
func TestCategoryGraph(t *testing.T) {
	mp := decode(t, categoryModel(t, "colour", true), onnx.Options{})
	g := mp.GetGraph()
	var names []string
	for _, in := range g.GetInput() {
		names = append(names, in.GetName())
	}
	assert.Equal(t, []string{"numbers", "colour"}, names)
	var pool []string
	for _, n := range g.GetNode() {
		if n.GetOpType() != "TfIdfVectorizer" {
			continue
		}
		assert.Equal(t, []string{"colour"}, n.GetInput())
		for _, a := range n.GetAttribute() {
			if a.GetName() == "pool_strings" {
				for _, s := range a.GetStrings() {
					pool = append(pool, string(s))
				}
			}
		}
	}
	assert.Equal(t, []string{"a", "b", "", "?", "NA"}, pool)
	found := false
	for _, init := range g.GetInitializer() {
		if init.GetName() == "colour_map" {
			found = true
			assert.Equal(t, []int64{5, 3}, init.GetDims())
			assert.Equal(t, []float64{
				1, 0, 0,
				0, 1, 0,
				0, 0, 1,
				0, 0, 1,
				0, 0, 1,
			}, raw(t, init))
		}
	}
	assert.True(t, found, "no initializer colour_map")
	md := metadata(mp)
	assert.Equal(t, `["x"]`, md["number_inputs"])
	assert.Equal(t, `["colour"]`, md["category_inputs"])
}

// Export a model to a file, in Go; `seine export` does the same.
func ExampleWrite() {
	s := &spec.Network{
		Version: 1, Name: "demo", Inputs: 2,
		Output: spec.Output{Classes: []string{"no", "yes"}, Activation: spec.Sigmoid},
		Init:   spec.Init{Scheme: spec.GlorotUniform, Seed: 1},
	}
	m, err := nn.NewModel(s, []float64{0.5, -1, 0.25}, nil, nil) // or nn.Load("model.seine.json")
	if err != nil {
		log.Fatal(err)
	}
	if err := onnx.Check(m); err != nil {
		log.Fatal(err) // names the feature that has no export
	}
	f, err := os.CreateTemp("", "demo-*.onnx")
	if err != nil {
		log.Fatal(err)
	}
	defer os.Remove(f.Name())
	if err := onnx.Write(f, m, onnx.Options{}); err != nil {
		log.Fatal(err)
	}
	if err := f.Close(); err != nil {
		log.Fatal(err)
	}
	fmt.Println("inputs:", onnx.NumbersInput, "[N, 2]; outputs:", onnx.ProbabilitiesOut, "[N, 2],", onnx.LabelOut, "[N]")
	// Output:
	// inputs: numbers [N, 2]; outputs: probabilities [N, 2], label [N]
}
