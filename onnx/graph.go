package onnx

import (
	"encoding/binary"
	"fmt"
	"math"

	"google.golang.org/protobuf/proto"

	pb "github.com/seine-ml/seine/internal/onnxpb"
)

// Element types of the tensors the graph uses (TensorProto.DataType).
var (
	tDouble = int32(pb.TensorProto_DOUBLE)
	tInt64  = int32(pb.TensorProto_INT64)
	tString = int32(pb.TensorProto_STRING)
)

// graph collects the nodes and initializers of one ONNX graph and hands
// out tensor names that cannot meet each other or the graph's inputs.
type graph struct {
	g       *pb.GraphProto
	names   map[string]bool   // every tensor name in use
	count   map[string]int    // per base name: how many were made
	scalars map[uint64]string // float64 scalar initializers by value bits
	// shapeOnly leaves initializers' values out: Check builds the graph to
	// find what cannot be exported without copying the params.
	shapeOnly bool
}

func newGraph(name string) *graph {
	return &graph{g: &pb.GraphProto{Name: proto.String(name)}, names: map[string]bool{}, count: map[string]int{}, scalars: map[uint64]string{}}
}

// reserve claims name exactly (a graph input or output); it reports false
// when the name is already taken.
func (b *graph) reserve(name string) bool {
	if b.names[name] {
		return false
	}
	b.names[name] = true
	return true
}

// fresh returns a new tensor name built from base: "base", "base_1", …
func (b *graph) fresh(base string) string {
	for {
		n := b.count[base]
		b.count[base] = n + 1
		name := base
		if n > 0 {
			name = fmt.Sprintf("%s_%d", base, n)
		}
		if b.reserve(name) {
			return name
		}
	}
}

// node appends a node of operator op and returns the name of its (single)
// output, made from out.
func (b *graph) node(op, out string, inputs []string, attrs ...*pb.AttributeProto) string {
	name := b.fresh(out)
	b.nodeTo(op, name, inputs, attrs...)
	return name
}

// nodeTo is node with an output name reserved in advance (a graph output).
func (b *graph) nodeTo(op, out string, inputs []string, attrs ...*pb.AttributeProto) {
	b.g.Node = append(b.g.Node, &pb.NodeProto{
		OpType:    proto.String(op),
		Name:      proto.String(out),
		Input:     inputs,
		Output:    []string{out},
		Attribute: attrs,
	})
}

// doubles adds a float64 initializer of shape dims holding v (row-major)
// and returns its name. The values go into raw_data as little-endian
// IEEE 754 binary64, so they are stored bit for bit.
func (b *graph) doubles(base string, dims []int64, v []float64) string {
	name := b.fresh(base)
	var raw []byte
	if !b.shapeOnly {
		raw = make([]byte, 8*len(v))
		for i, x := range v {
			binary.LittleEndian.PutUint64(raw[8*i:], math.Float64bits(x))
		}
	}
	b.g.Initializer = append(b.g.Initializer, &pb.TensorProto{
		Name: proto.String(name), Dims: dims, DataType: proto.Int32(tDouble), RawData: raw,
	})
	return name
}

// scalar returns a float64 scalar initializer holding v, added on first use.
func (b *graph) scalar(base string, v float64) string {
	k := math.Float64bits(v)
	if n, ok := b.scalars[k]; ok {
		return n
	}
	n := b.doubles(base, []int64{}, []float64{v})
	b.scalars[k] = n
	return n
}

// int64s adds a 1-D int64 initializer.
func (b *graph) int64s(base string, v []int64) string {
	name := b.fresh(base)
	b.g.Initializer = append(b.g.Initializer, &pb.TensorProto{
		Name: proto.String(name), Dims: []int64{int64(len(v))}, DataType: proto.Int32(tInt64), Int64Data: v,
	})
	return name
}

// input declares a graph input of element type elem and shape
// [N, cols], N being the symbolic row count.
func (b *graph) input(name string, elem int32, cols int, doc string) {
	b.g.Input = append(b.g.Input, valueInfo(name, elem, doc, rowDim(), fixedDim(cols)))
}

// output declares a graph output.
func (b *graph) output(name string, elem int32, doc string, dims ...*pb.TensorShapeProto_Dimension) {
	b.g.Output = append(b.g.Output, valueInfo(name, elem, doc, dims...))
}

func valueInfo(name string, elem int32, doc string, dims ...*pb.TensorShapeProto_Dimension) *pb.ValueInfoProto {
	return &pb.ValueInfoProto{
		Name:      proto.String(name),
		DocString: proto.String(doc),
		Type: &pb.TypeProto{Value: &pb.TypeProto_TensorType{TensorType: &pb.TypeProto_Tensor{
			ElemType: proto.Int32(elem),
			Shape:    &pb.TensorShapeProto{Dim: dims},
		}}},
	}
}

// rowDim is the symbolic batch dimension "N".
func rowDim() *pb.TensorShapeProto_Dimension {
	return &pb.TensorShapeProto_Dimension{Value: &pb.TensorShapeProto_Dimension_DimParam{DimParam: "N"}}
}

func fixedDim(n int) *pb.TensorShapeProto_Dimension {
	return &pb.TensorShapeProto_Dimension{Value: &pb.TensorShapeProto_Dimension_DimValue{DimValue: int64(n)}}
}

// Attributes.

func attrInt(name string, v int64) *pb.AttributeProto {
	return &pb.AttributeProto{Name: proto.String(name), Type: pb.AttributeProto_INT.Enum(), I: proto.Int64(v)}
}

func attrInts(name string, v []int64) *pb.AttributeProto {
	return &pb.AttributeProto{Name: proto.String(name), Type: pb.AttributeProto_INTS.Enum(), Ints: v}
}

func attrString(name, v string) *pb.AttributeProto {
	return &pb.AttributeProto{Name: proto.String(name), Type: pb.AttributeProto_STRING.Enum(), S: []byte(v)}
}

func attrStrings(name string, v []string) *pb.AttributeProto {
	s := make([][]byte, len(v))
	for i, x := range v {
		s[i] = []byte(x)
	}
	return &pb.AttributeProto{Name: proto.String(name), Type: pb.AttributeProto_STRINGS.Enum(), Strings: s}
}
