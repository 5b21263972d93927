package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"runtime"
	"strconv"
	"strings"
	"unicode"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/internal/fit"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/onnx"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// defaultInspectRows is the number of rows the memory estimate assumes for
// a spec when -rows is not given.
const defaultInspectRows = 10_000

const inspectHelp = `Describes the net of a spec or model: each weight layer (units in and out,
activation, weights, biases), the param count and its size, the floating-
point operations per row to predict and for one cost-and-gradient
evaluation (a multiply-add counts 2), and an estimate of the most memory
that seine train takes on -rows rows (default 10000, or a model's training
and holdout rows): the data as read, the encoded data, the evaluation
workspaces of GOMAXPROCS workers, the gradient, the optimizer's vectors and
the tool itself. seine train keeps Go's heap near this estimate (a soft
limit, unless GOMEMLIMIT is set). For a model it also shows how it was
trained.
`

func runInspect(ctx context.Context, e *env, args []string) error {
	fs := newFlags("inspect", e)
	specPath := specFlag(fs)
	modelPath := modelFlag(fs)
	rows := fs.Int("rows", 0, "training `rows` for the memory estimate (default 10000, or the model's training rows)")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if (*specPath == "") == (*modelPath == "") {
		return usagef("give exactly one of -spec FILE and -model FILE")
	}
	if *rows < 0 {
		return usagef("-rows %d: want a row count ≥ 1", *rows)
	}
	var (
		s       *spec.Network
		m       *nn.Model
		path    string
		err     error
		kind    = "spec"
		train   = defaultInspectRows
		holdout int
	)
	if *specPath != "" {
		path = *specPath
		if s, err = loadSpec(ctx, path); err != nil {
			return err
		}
	} else {
		path, kind = *modelPath, "model"
		if m, err = loadModel(ctx, path); err != nil {
			return err
		}
		s = m.Spec()
		if m.Summary().TrainRows > 0 {
			train, holdout = m.Summary().TrainRows, m.Summary().HoldoutRows
		}
	}
	if *rows > 0 {
		train, holdout = *rows, 0
	}
	// Levels still to be learned from the training rows count as two per
	// category, to show the rest of the net.
	net, err := nn.Compile(encode.Placeholder(s))
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	writeInspect(e.stdout, kind, path, s, net, train, holdout)
	if m == nil && s.Types != nil {
		writeSpecInputs(e.stdout, s)
	}
	if m != nil {
		writeModelSummary(e.stdout, m)
	}
	return nil
}

func writeInspect(w io.Writer, kind, path string, s *spec.Network, net *nn.Net, rows, holdout int) {
	name := safe(s.Name)
	if name == "" {
		name = "(unnamed)"
	}
	fmt.Fprintf(w, "%s %s (%s)\n", kind, name, safe(path))
	fmt.Fprintf(w, "  %d inputs", s.Inputs)
	if s.Features != nil {
		fmt.Fprintf(w, " (%s)", shortList(safeAll(s.Features), 6))
	}
	fmt.Fprintf(w, "; %d classes (%s)", len(s.Output.Classes), shortList(safeAll(s.Output.Classes), 8))
	if s.Output.Multilabel {
		fmt.Fprint(w, ", multi-label")
	}
	fmt.Fprintln(w)

	sizes := net.Sizes()
	fmt.Fprintf(w, "\n  %-5s  %11s  %-10s  %9s  %7s  %9s\n", "layer", "units", "activation", "weights", "biases", "params")
	for l := 0; l < net.NumLayers(); l++ {
		in, out := sizes[l], sizes[l+1]
		act := s.Output.Activation
		if l < len(s.Hidden) {
			act = s.Hidden[l].Activation
		}
		fmt.Fprintf(w, "  %-5d  %s  %-10s  %9d  %7d  %9d\n", l+1, padLeft(fmt.Sprintf("%d → %d", in, out), 11), act, in*out, out, (in+1)*out)
	}
	P := net.NumParams()
	fmt.Fprintf(w, "  %-5s  %11s  %-10s  %9s  %7s  %9d\n", "all", "", "", "", "", P)

	predict, evaluate := net.FLOPs()
	fmt.Fprintln(w)
	fmt.Fprintf(w, "  params          %d float64 = %s\n", P, bytesText(8*int64(P)))
	fmt.Fprintf(w, "  FLOPs per row   %s to predict, %s for cost and gradient\n", countText(predict), countText(evaluate))

	mem := estimateTraining(net, s, rows, holdout)
	method, stateWords := optimState(s.Train.Optimizer)
	fmt.Fprintf(w, "  training on %d rows", rows)
	if holdout > 0 {
		fmt.Fprintf(w, " (+%d holdout)", holdout)
	}
	fmt.Fprintf(w, ", %d workers: peak about %s\n", runtime.GOMAXPROCS(0), bytesText(mem.Peak()))
	fmt.Fprintf(w, "    data as read         %s (x as read, y and line numbers)\n", bytesText(mem.Read))
	fmt.Fprintf(w, "    data and evaluation  %s (encoded x and y, workspaces, gradient)\n", bytesText(mem.Objective+mem.Holdout))
	fmt.Fprintf(w, "    optimizer (%s)%s %s (%d vectors of %d params)\n", method, strings.Repeat(" ", max(0, 8-len(method))), bytesText(mem.State), stateWords, P)
	if mem.split() > mem.Objective+mem.Holdout+mem.State {
		fmt.Fprintf(w, "    (splitting off the holdout copies the rows as read: %s at once)\n", bytesText(mem.split()))
	}
	fmt.Fprintf(w, "    the tool itself      %s\n", bytesText(toolBytes))
}

// optimState returns the name of the method a spec trains with and the
// number of params-long vectors training keeps for it: the start point that
// the training driver hands to optim.Minimize, plus optim.StateVectors of
// the method (the run's point, gradient and best point, and the method's
// own workspace).
func optimState(o spec.Optimizer) (string, int) {
	if o == 0 {
		o = spec.LBFGS
	}
	m, err := fit.MethodFor(o, 0, 0)
	if err != nil {
		return o.String(), 0
	}
	return o.String(), 1 + optim.StateVectors(m)
}

func writeModelSummary(w io.Writer, m *nn.Model) {
	sm := m.Summary()
	fmt.Fprintf(w, "\n  trained with    %s, %d iterations, %.0f evaluations, %.2fs (seine %s)\n", safe(sm.Method), sm.Iterations, sm.Evaluations, sm.Elapsed.Seconds(), safe(sm.Library))
	fmt.Fprintf(w, "  stopped         %s\n", safe(stopReason(sm.Status)))
	fmt.Fprintf(w, "  seed            %d\n", sm.Seed)
	writeEncoder(w, m.Encoder())
	if err := onnx.Check(m); err != nil {
		fmt.Fprintf(w, "  ONNX export     not possible: %v\n", err)
	} else {
		fmt.Fprintf(w, "  ONNX export     possible (seine export; opset %d, IR version %d)\n", onnx.DefaultOpset, onnx.IRVersion)
	}
	fmt.Fprintf(w, "  training rows   %d: cost %s, accuracy %s\n", sm.TrainRows, numText(sm.Cost, 1, "%.6g"), numText(sm.TrainAccuracy, 100, "%.2f%%"))
	if sm.HoldoutRows > 0 {
		fmt.Fprintf(w, "  holdout rows    %d: cross-entropy %s, accuracy %s\n", sm.HoldoutRows, numText(sm.HoldoutCost, 1, "%.6g"), numText(sm.HoldoutAccuracy, 100, "%.2f%%"))
	} else {
		fmt.Fprintf(w, "  holdout rows    none\n")
	}
}

// writeSpecInputs lists a spec's typed inputs: type, levels and rules.
func writeSpecInputs(w io.Writer, s *spec.Network) {
	fmt.Fprintf(w, "\n  inputs\n")
	for i, name := range s.Features {
		t := s.Types[i]
		switch t.Type {
		case spec.CategoryInput:
			lv := "levels learned from the training rows (counted as 2 units above)"
			if t.Levels != nil {
				lv = fmt.Sprintf("%d levels: %s", len(t.Levels), shortList(safeAll(t.Levels), 6))
			}
			fmt.Fprintf(w, "    %s  category, %s; missing: %s, unknown: %s\n", safe(name), lv, t.Missing, t.Unknown)
		default:
			fmt.Fprintf(w, "    %s  number; missing: %s\n", safe(name), missingText(t.Missing, t.Fill))
		}
	}
}

func missingText(r spec.MissingRule, fill float64) string {
	if r == spec.MissingConstant {
		return fmt.Sprintf("constant %v", fill)
	}
	return r.String()
}

// writeEncoder lists a model's raw inputs: type, levels or fill value and
// scaling, and the input units each occupies.
func writeEncoder(w io.Writer, enc *encode.Encoder) {
	fmt.Fprintf(w, "  inputs          %d raw inputs → %d input units (missing tokens: %s)\n", enc.NumInputs(), enc.Width(), quoteList(enc.MissingTokens()))
	for _, in := range enc.Inputs() {
		units := fmt.Sprintf("unit %d", in.Offset)
		if n := in.Units(); n > 1 {
			units = fmt.Sprintf("units %d–%d", in.Offset, in.Offset+n-1)
		}
		switch in.Type {
		case spec.CategoryInput:
			extra := ""
			switch in.Missing {
			case spec.MissingLevel:
				extra = ", missing: a unit of its own (the last)"
			case spec.MissingMode:
				extra = fmt.Sprintf(", missing: the mode %q", safe(in.Levels[int(in.Fill)]))
			default:
				extra = ", missing: refused"
			}
			fmt.Fprintf(w, "    %-14s  %s  category, %d levels (%s)%s, unknown: %s\n", safe(in.Name), units, len(in.Levels), shortList(safeAll(in.Levels), 6), extra, in.Unknown)
		default:
			fill := "missing: refused"
			if in.Missing != spec.MissingRefuse {
				fill = fmt.Sprintf("missing: %s = %.6g", in.Missing, in.Fill)
			}
			scale := "not scaled"
			if in.Mean != 0 || in.Scale != 1 {
				scale = fmt.Sprintf("(x − %.6g) / %.6g", in.Mean, in.Scale)
			}
			fmt.Fprintf(w, "    %-14s  %s  number, %s, %s\n", safe(in.Name), units, fill, scale)
		}
	}
}

// safe escapes the control characters of a text that came from a file, so
// that printing it cannot move the cursor or retitle the terminal.
func safe(t string) string {
	var b strings.Builder
	for _, r := range t {
		if unicode.IsControl(r) || r == '\u2028' || r == '\u2029' {
			q := strconv.QuoteRune(r)
			b.WriteString(q[1 : len(q)-1])
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

func safeAll(l []string) []string {
	out := make([]string, len(l))
	for i, t := range l {
		out[i] = safe(t)
	}
	return out
}

func quoteList(l []string) string {
	q := make([]string, len(l))
	for i, t := range l {
		q[i] = strconv.Quote(t)
	}
	return strings.Join(q, ", ")
}

func numText(v, mul float64, format string) string {
	if math.IsNaN(v) {
		return "not measured"
	}
	return fmt.Sprintf(format, v*mul)
}

// padLeft right-aligns s in a field of width runes.
func padLeft(s string, width int) string {
	if n := len([]rune(s)); n < width {
		return strings.Repeat(" ", width-n) + s
	}
	return s
}

// shortList joins names, cutting the list after n of them.
func shortList(names []string, n int) string {
	if len(names) <= n {
		return strings.Join(names, ", ")
	}
	return strings.Join(names[:n], ", ") + fmt.Sprintf(", … %d more", len(names)-n)
}

// bytesText writes a byte count with a binary unit, e.g. "4.2 KiB".
func bytesText(b int64) string {
	const unit = 1024
	if b < unit {
		return fmt.Sprintf("%d B", b)
	}
	v, i := float64(b), 0
	for v >= unit && i < 4 {
		v /= unit
		i++
	}
	return fmt.Sprintf("%.1f %s", v, []string{"B", "KiB", "MiB", "GiB", "TiB"}[i])
}

// countText writes a large count with thousands separators.
func countText(v float64) string {
	s := fmt.Sprintf("%.0f", v)
	var b strings.Builder
	for i, r := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(r)
	}
	return b.String()
}
