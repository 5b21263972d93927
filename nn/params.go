package nn

import (
	"encoding/base64"
	"encoding/binary"
	"fmt"
	"math"
	"unsafe"
)

// paramData is the "data" of a model file's params: base64 of the params
// as little-endian IEEE 754 doubles. Unmarshalling decodes the base64
// straight into the float64 slice the model keeps, through a byte view of
// its memory, so that reading a model costs its file plus its params and
// no third copy (issue 13: a model file of F bytes now peaks near 1.75F).
type paramData struct {
	v   []float64
	raw []byte // v's memory as little-endian bytes, for the digest
}

// littleEndian reports whether float64s are stored little-endian here, as
// the file stores them (amd64, arm64 and every other platform Go supports
// but s390x and the big-endian ppc64 and mips ones).
var littleEndian = func() bool {
	x := uint16(1)
	return *(*byte)(unsafe.Pointer(&x)) == 1
}()

// UnmarshalJSON decodes the JSON string literal b. encoding/json hands an
// Unmarshaler the literal in its own input, so nothing is copied before the
// decode.
func (p *paramData) UnmarshalJSON(b []byte) error {
	if len(b) < 2 || b[0] != '"' || b[len(b)-1] != '"' {
		return fmt.Errorf("params data: want a base64 string")
	}
	s := b[1 : len(b)-1]
	for _, c := range s {
		if c == '\\' {
			return fmt.Errorf("params data: escapes are not base64")
		}
	}
	n := base64.StdEncoding.DecodedLen(len(s))
	v := make([]float64, (n+7)/8)
	var view []byte
	if len(v) > 0 {
		view = unsafe.Slice((*byte)(unsafe.Pointer(&v[0])), 8*len(v))
	}
	k, err := base64.StdEncoding.Decode(view, s)
	if err != nil {
		return fmt.Errorf("params data: %w", err)
	}
	if k%8 != 0 {
		return fmt.Errorf("params data holds %d bytes, not a whole number of float64s", k)
	}
	p.v, p.raw = v[:k/8], view[:k]
	if !littleEndian {
		// Keep the file's bytes for the digest; convert the values.
		p.raw = append([]byte(nil), view[:k]...)
		for i := range p.v {
			p.v[i] = math.Float64frombits(binary.LittleEndian.Uint64(p.raw[8*i:]))
		}
	}
	return nil
}

// MarshalJSON writes the base64 of raw.
func (p paramData) MarshalJSON() ([]byte, error) {
	out := make([]byte, 0, base64.StdEncoding.EncodedLen(len(p.raw))+2)
	out = append(out, '"')
	out = base64.StdEncoding.AppendEncode(out, p.raw)
	return append(out, '"'), nil
}
