package main

import (
	"bufio"
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

const predictHelp = `Writes CSV: a header, then one line per data row in the input's order. The
first column, "class", holds the class decided for the row: the most
probable class, or for a binary sigmoid model with an operating threshold
(chosen by train -threshold-rule, or given with -threshold) the second
class when its probability is at least the threshold. For a multi-label
model the column is named "classes" and holds the classes whose
probability is at least their threshold (the model's, else 0.5, or
-threshold for all), joined with '|' ("" when none). Softmax models always
take the most probable class. With -probabilities a
column "p_CLASS" per class follows, with the probability to -digits
significant digits (6 by default; -digits 0 writes the shortest form that
reads back to the same float64).

The input needs the model's input columns, picked by name in any order
(other columns are ignored), with the raw values the model was trained on:
text for category inputs, numbers or missing cells (as the model's missing
tokens, e.g. "" or "?") where the input's rule fills them. The label column
the model was trained with (or -label) is ignored when present. -keep copies
named columns (e.g. an id) in front of the predictions so that rows can be
joined back. -out is written in full and then renamed into place, so a
failure never leaves a partial file; without -out the CSV goes to standard
output.
`

func runPredict(ctx context.Context, e *env, args []string) error {
	fs := newFlags("predict", e)
	comma := commaFlag(fs)
	modelPath := modelFlag(fs)
	dataPath := dataFlag(fs, false)
	out := fs.String("out", "", "write the predictions to `FILE` instead of standard output")
	probs := fs.Bool("probabilities", false, "add one probability column per class")
	digits := fs.Int("digits", 6, "significant `DIGITS` of the probabilities; 0 writes the shortest form that reads back to the same float64")
	label := labelFlag(fs, true)
	keep := fs.String("keep", "", "comma-separated `COLUMNS` copied from the input to the output, e.g. id,ts, to join rows back")
	threshold := thresholdFlag(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := requireFlags("model", *modelPath, "data", *dataPath); err != nil {
		return err
	}
	if *digits < 0 || *digits > 17 {
		return usagef("-digits %d: want 1 to 17 significant digits, or 0 for exact", *digits)
	}
	if err := checkThreshold(*threshold); err != nil {
		return err
	}
	if *out != "" {
		if err := refuseOverwrite("-out", *out, "model", *modelPath, "data", *dataPath); err != nil {
			return err
		}
	}
	m, thresholds, err := loadDecidingModel(ctx, *modelPath, *threshold)
	if err != nil {
		return err
	}
	opt := withComma(dataForModel(m, *label, true), comma)
	if *keep != "" {
		opt.Keep = strings.Split(*keep, ",")
		for i, k := range opt.Keep {
			opt.Keep[i] = strings.TrimSpace(k)
		}
	}
	set, err := loadData(ctx, *dataPath, opt)
	if err != nil {
		return err
	}
	p, err := m.ProbabilitiesSet(set)
	if err != nil {
		return prefixLines(*dataPath, err)
	}
	if err := checkFinite(p, set, *dataPath); err != nil {
		return err
	}
	write := func(w io.Writer) error {
		return writePredictions(w, m, p, opt.Keep, set.Kept, *probs, thresholds, *digits)
	}
	if *out == "" {
		bw := bufio.NewWriter(e.stdout)
		if err := write(bw); err != nil {
			return err
		}
		return bw.Flush()
	}
	if err := writeAtomic(*out, write); err != nil {
		return fmt.Errorf("-out %s: %w", *out, err)
	}
	fmt.Fprintf(e.stderr, "seine predict: wrote %d rows to %s\n", set.Rows(), *out)
	return nil
}

// writePredictions writes the CSV of predict for the probabilities p.
func writePredictions(w io.Writer, m *nn.Model, p *mat.Dense, keep []string, kept [][]string, probs bool, thresholds []float64, digits int) error {
	if digits == 0 {
		digits = -1 // strconv: the shortest form that reads back exactly
	}
	cw := csv.NewWriter(w)
	head := append(slices.Clone(keep), "class")
	nk := len(keep)
	if m.Multilabel() {
		head[nk] = "classes"
	}
	if probs {
		for _, c := range m.Classes() {
			head = append(head, "p_"+c)
		}
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	rows, k := p.Dims()
	rec := make([]string, len(head))
	var set []string
	for i := 0; i < rows; i++ {
		row := p.RawRowView(i)
		if m.Multilabel() {
			set = set[:0]
			for j, v := range row {
				t := 0.5
				if thresholds != nil {
					t = thresholds[j]
				}
				if v >= t {
					set = append(set, m.Classes()[j])
				}
			}
			rec[nk] = strings.Join(set, "|")
		} else {
			best := 0
			for j := 1; j < k; j++ {
				if row[j] > row[best] {
					best = j
				}
			}
			if thresholds != nil { // binary sigmoid: class 1 when p₁ ≥ t
				best = 0
				if row[1] >= thresholds[0] {
					best = 1
				}
			}
			rec[nk] = m.Classes()[best]
		}
		if nk > 0 {
			copy(rec, kept[i])
		}
		if probs {
			for j, v := range row {
				rec[nk+1+j] = strconv.FormatFloat(v, 'g', digits, 64)
			}
		}
		if len(rec) == 1 && rec[0] == "" {
			// A lone empty field would make a blank line, which CSV
			// readers skip (RFC 4180 readers differ; Go's skips it): quote
			// it so that the row count stays that of the input.
			cw.Flush()
			if _, err := io.WriteString(w, "\"\"\n"); err != nil {
				return err
			}
			continue
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// loadDecidingModel loads the model at path and the operating thresholds
// that predict, evaluate and report apply to its probabilities (see
// decisionThresholds).
func loadDecidingModel(ctx context.Context, path string, override float64) (*nn.Model, []float64, error) {
	m, err := loadModel(ctx, path)
	if err != nil {
		return nil, nil, err
	}
	th, err := decisionThresholds(m, override, path)
	if err != nil {
		return nil, nil, err
	}
	return m, th, nil
}

// decisionThresholds returns the operating thresholds that predict and
// evaluate apply to m's probabilities: override (from -threshold) for
// every sigmoid class, else the model's own (nil for none: 0.5 for
// multi-label models, the most probable class otherwise). A softmax model
// takes no threshold.
func decisionThresholds(m *nn.Model, override float64, path string) ([]float64, error) {
	sigmoid := m.Spec().Output.Activation == spec.Sigmoid
	if override == 0 {
		if !sigmoid {
			return nil, nil
		}
		return m.Decision().Thresholds, nil
	}
	switch {
	case !sigmoid:
		return nil, usagef("-threshold applies to sigmoid outputs only; %s is a softmax model, which takes the most probable class", path)
	case m.Multilabel():
		t := make([]float64, len(m.Classes()))
		for i := range t {
			t[i] = override
		}
		return t, nil
	case len(m.Classes()) == 2:
		return []float64{override}, nil
	}
	return nil, usagef("-threshold: %s has %d independent sigmoid classes but is not multi-label", path, len(m.Classes()))
}

// checkFinite reports the first row whose probabilities are not finite
// (params near the float64 range can overflow on ordinary rows), naming
// the file and line, so that predict never prints NaN.
func checkFinite(p *mat.Dense, set *data.Set, path string) error {
	r, _ := p.Dims()
	for i := range r {
		for _, v := range p.RawRowView(i) {
			if !(v >= 0 && v <= 1) {
				line := i + 2
				if set.Lines != nil {
					line = set.Lines[i]
				}
				return fmt.Errorf("%s: line %d (row %d): the model's probabilities are %v, not finite: its params overflow on this row", path, line, i+1, v)
			}
		}
	}
	return nil
}
