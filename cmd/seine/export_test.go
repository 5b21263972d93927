package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"google.golang.org/protobuf/proto"

	pb "github.com/seine-ml/seine/internal/onnxpb"
	"github.com/seine-ml/seine/nn"
)

// TestExport exports the base model and reads the file back with the
// message types generated from onnx.proto. The numbers of the graph are
// checked against the ONNX runtime in package onnx.
func TestExport(t *testing.T) {
	out := filepath.Join(t.TempDir(), "triage.onnx")
	r := seine(t, "export", "-model", baseModel, "-out", out)
	require.Equal(t, 0, r.code, "stderr: %s", r.stderr)
	assert.Contains(t, r.stderr, "seine export: wrote "+out)
	b, err := os.ReadFile(out)
	require.NoError(t, err)
	var mp pb.ModelProto
	require.NoError(t, proto.Unmarshal(b, &mp))
	assert.Equal(t, int64(8), mp.GetIrVersion())
	assert.Equal(t, int64(17), mp.GetOpsetImport()[0].GetVersion())

	m, err := nn.Load(baseModel)
	require.NoError(t, err)
	meta := map[string]string{}
	for _, e := range mp.GetMetadataProps() {
		meta[e.GetKey()] = e.GetValue()
	}
	var classes []string
	require.NoError(t, json.Unmarshal([]byte(meta["classes"]), &classes))
	assert.Equal(t, m.Classes(), classes)
	assert.Equal(t, "session-triage", meta["spec_name"])

	r = seine(t, "export", "-model", baseModel, "-out", out, "-opset", "13")
	require.Equal(t, 0, r.code, "stderr: %s", r.stderr)
	b, err = os.ReadFile(out)
	require.NoError(t, err)
	require.NoError(t, proto.Unmarshal(b, &mp))
	assert.Equal(t, int64(13), mp.GetOpsetImport()[0].GetVersion())
}

func TestExportUsage(t *testing.T) {
	model := copyFile(t, baseModel, t.TempDir(), "m.seine.json")
	for _, tt := range []struct {
		name string
		args []string
		want []string
	}{
		{"no model", []string{"export", "-out", "m.onnx"}, []string{"-model is required"}},
		{"no out", []string{"export", "-model", "m.seine.json"}, []string{"-out is required"}},
		{"opset too old", []string{"export", "-model", "m", "-out", "o", "-opset", "12"}, []string{"-opset 12", "13 to 17"}},
		{"opset too new", []string{"export", "-model", "m", "-out", "o", "-opset", "18"}, []string{"-opset 18"}},
		{"out is the model", []string{"export", "-model", model, "-out", model}, []string{"refusing to overwrite"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			r := runIn(tt.args...)
			require.Equal(t, 2, r.code, "stderr %q", r.stderr)
			oneLineError(t, r.stderr, append(tt.want, "seine help export")...)
		})
	}
	r := runIn("help", "export")
	assert.Equal(t, 0, r.code)
	assert.Contains(t, r.stdout, "Usage: seine export -model FILE -out FILE")
}

// TestExportRefused: a model whose category input is named "label" cannot
// be exported (the graph's output has that name); the message names the
// input, the status is 1 and the file already at -out is left as it was.
func TestExportRefused(t *testing.T) {
	dir := t.TempDir()
	specPath := filepath.Join(dir, "s.yaml")
	require.NoError(t, os.WriteFile(specPath, []byte(`version: 1
name: clash
inputs:
  - u
  - {name: label, type: category}
output: {classes: ["no", "yes"], activation: sigmoid}
`), 0o644))
	var csv strings.Builder
	csv.WriteString("u,label,answer\n")
	for _, row := range []string{"0.5,a,yes", "-1,b,no", "2,a,yes", "-0.5,b,no", "1,b,yes", "-2,a,no"} {
		csv.WriteString(row + "\n")
	}
	dataPath := filepath.Join(dir, "d.csv")
	require.NoError(t, os.WriteFile(dataPath, []byte(csv.String()), 0o644))
	model := filepath.Join(dir, "m.seine.json")
	r := seine(t, "train", "-spec", specPath, "-data", dataPath, "-out", model, "-iterations", "3", "-quiet")
	require.Equal(t, 0, r.code, "train: %s", r.stderr)

	out := filepath.Join(dir, "keep.onnx")
	require.NoError(t, os.WriteFile(out, []byte("before"), 0o644))
	r = seine(t, "export", "-model", model, "-out", out)
	require.Equal(t, 1, r.code, "stderr %q", r.stderr)
	oneLineError(t, r.stderr, "seine export:", model, "cannot export", `category input "label"`)
	b, err := os.ReadFile(out)
	require.NoError(t, err)
	assert.Equal(t, "before", string(b))
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	for _, e := range entries {
		assert.False(t, strings.Contains(e.Name(), ".tmp-"), "left behind: %s", e.Name())
	}
}
