package spec

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"testing"
)

var sink *Network

func BenchmarkParse(b *testing.B) {
	for _, f := range []string{"units.yaml", "full.yaml"} {
		data, err := os.ReadFile(filepath.Join("testdata", "good", f))
		if err != nil {
			b.Fatal(err)
		}
		b.Run(f, func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				n, err := Parse(bytes.NewReader(data))
				if err != nil {
					b.Fatal(err)
				}
				sink = n
			}
		})
	}
}

func BenchmarkWriteYAML(b *testing.B) {
	n, err := Parse(bytes.NewReader([]byte(head + "hidden: [{units: 32, activation: tanh}]\noutput: {classes: [a, b, c]}\n")))
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if err := n.WriteYAML(io.Discard); err != nil {
			b.Fatal(err)
		}
	}
}
