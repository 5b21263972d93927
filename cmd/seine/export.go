package main

import (
	"context"
	"fmt"
	"io"
	"os"

	"github.com/seine-ml/seine/onnx"
)

const exportHelp = `Writes the model as an ONNX model (IR version 8, default-domain opset 17
unless -opset says 13 to 16) whose graph does everything predict does:
fills and scales number inputs, one-hot encodes category inputs, runs each
layer and the output activation, all in float64. Inputs: "numbers", a
float64 tensor [N, number inputs] in the model's input order, with NaN for
a missing value, and one string tensor [N, 1] per category input, named
after it, holding the cell text without surrounding spaces. Outputs:
"probabilities" [N, classes] float64, "label" [N] int64, the index of the
class predict decides (the model's temperature and operating threshold
included), and for a multi-label model "labels" [N, classes] int64, 1 for
each class present. The metadata holds the class names (classes, a JSON
list), the spec name, the seine version, the model's sha256, the input
names (number_inputs and category_inputs, JSON lists) and, when the model
has them, its temperature and thresholds.

The graph cannot refuse a row: a level never seen in training gives zeros
for that input even under unknown: refuse, where predict refuses the row.
A model that cannot be exported is refused, naming the feature. -out is
written in full and then renamed into place, so a failure never leaves a
partial file.
`

func runExport(ctx context.Context, e *env, args []string) error {
	fs := newFlags("export", e)
	modelPath := modelFlag(fs)
	out := fs.String("out", "", "ONNX `FILE` to write, e.g. model.onnx")
	opset := fs.Int("opset", onnx.DefaultOpset, fmt.Sprintf("default-domain ONNX `opset` to declare, %d to %d", onnx.MinOpset, onnx.MaxOpset))
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := requireFlags("model", *modelPath, "out", *out); err != nil {
		return err
	}
	if *opset < onnx.MinOpset || *opset > onnx.MaxOpset {
		return usagef("-opset %d: want %d to %d", *opset, onnx.MinOpset, onnx.MaxOpset)
	}
	if err := refuseOverwrite("-out", *out, "model", *modelPath); err != nil {
		return err
	}
	m, err := loadModel(ctx, *modelPath)
	if err != nil {
		return err
	}
	if err := onnx.Check(m); err != nil {
		return fmt.Errorf("%s: %w", *modelPath, err)
	}
	if err := writeAtomic(*out, func(w io.Writer) error { return onnx.Write(w, m, onnx.Options{Opset: *opset}) }); err != nil {
		return fmt.Errorf("-out %s: %w", *out, err)
	}
	st, err := os.Stat(*out)
	if err != nil {
		return fmt.Errorf("-out %s: %w", *out, err)
	}
	fmt.Fprintf(e.stderr, "seine export: wrote %s (%d bytes, opset %d, %d classes)\n", *out, st.Size(), *opset, m.NumClasses())
	return nil
}
