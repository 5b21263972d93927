package main

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"

	"github.com/seine-ml/seine/diag"
	"github.com/seine-ml/seine/internal/ctxio"
	"github.com/seine-ml/seine/internal/report"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/score"
)

const reportHelp = `Writes one HTML page about the model on the labelled rows of -data: the
model's spec and training summary, the data (file, rows, SHA-256), the
figures of evaluate with one row per class, the confusion matrix
(single-label models), the ROC and precision–recall curves with the
operating point marked, the reliability diagram with the expected
calibration error (and the holdout ECE before and after the model's
temperature, when it has one), the importance of each input, the decision
(thresholds, rule, temperature) and the cautions below.

Input importance is permutation importance (Breiman 2001; Fisher, Rudin &
Dominici 2019): each input's column is shuffled among the rows -repeats
times and the rows scored again; the page shows the mean rise in
cross-entropy with its spread and the fall in accuracy. A category input is
shuffled as a whole. The same -seed gives the same figures on any machine.
Measured on training rows it shows what the model learned to use; on rows it
never saw, what helps it on new data.

The page holds everything it shows (styles inline, plots as inline SVG) and
loads nothing, so it can be mailed, archived or opened offline; it reads on
a laptop screen and prints to A4. The figures are also in the page as text
(ids and data- attributes), so tools can read them back. -out is written in
full and then renamed into place.

` + decisionCaution

// peopleCaution is the README's caution about decisions that affect
// people, repeated in every report.
const peopleCaution = `A classifier's output can drive decisions about people. Validate every model
on data from your own setting before you rely on it, and keep validating it
as that data drifts; look for differences in error rates between groups of
people and for features that stand in for protected attributes; treat a
model as one input to a decision, never as a substitute for professional or
licensed judgment (medical, legal, financial, safety); and follow the rules
that apply where you deploy it.`

func runReport(ctx context.Context, e *env, args []string) error {
	fs := newFlags("report", e)
	comma := commaFlag(fs)
	modelPath := modelFlag(fs)
	dataPath := dataFlag(fs, true)
	out := fs.String("out", "", "HTML `FILE` to write (conventionally NAME.html)")
	label := labelFlag(fs, true)
	repeats := fs.Int("repeats", diag.DefaultRepeats, "shuffles of each input for its importance, `N` ≥ 1")
	seed := fs.Uint64("seed", 1, "seed of the shuffles")
	threshold := thresholdFlag(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := requireFlags("model", *modelPath, "data", *dataPath, "out", *out); err != nil {
		return err
	}
	if *repeats < 1 {
		return usagef("-repeats %d: want at least 1", *repeats)
	}
	if err := checkThreshold(*threshold); err != nil {
		return err
	}
	if err := refuseOverwrite("-out", *out, "model", *modelPath, "data", *dataPath); err != nil {
		return err
	}
	if err := checkWritable("-out", *out); err != nil {
		return err
	}
	m, thresholds, err := loadDecidingModel(ctx, *modelPath, *threshold)
	if err != nil {
		return err
	}
	set, err := loadData(ctx, *dataPath, withComma(dataForModel(m, *label, false), comma))
	if err != nil {
		return err
	}
	digest, err := fileSHA256(ctx, *dataPath)
	if err != nil {
		return openError("data", err)
	}
	rep, err := evaluate(m, set, thresholds)
	if err != nil {
		return prefixLines(*dataPath, err)
	}
	rep.Warnings = score.Warnings(rep, baseName(*dataPath), tilted(m))
	for _, w := range rep.Warnings {
		fmt.Fprintf(e.stderr, "seine report: warning: %s\n", w)
	}
	im, err := diag.PermutationImportance(ctx, m, set, diag.ImportanceOptions{Repeats: *repeats, Seed: *seed, Thresholds: thresholds})
	if err != nil {
		return prefixLines(*dataPath, err)
	}
	title := fmt.Sprintf("%s on %s", displayName(m), baseName(*dataPath))
	page := &report.Page{
		Model: m, ModelFile: baseName(*modelPath), Report: rep, Override: *threshold, Importance: im,
		Data:     report.Data{File: baseName(*dataPath), Rows: set.Rows(), SHA256: digest},
		Cautions: []string{oneParagraph(decisionCaution), oneParagraph(peopleCaution)},
		Version:  "seine " + nn.Version,
	}
	if len(curveClasses(rep)) > 0 {
		page.ROC, page.PR = rocPlot(rep, title), prPlot(rep, title)
	}
	page.Reliability = reliabilityPlot(rep, title)
	if err := writeAtomic(*out, func(w io.Writer) error { return report.Write(w, page) }); err != nil {
		return fmt.Errorf("-out %s: %w", *out, err)
	}
	fmt.Fprintf(e.stderr, "seine report: wrote %s (%s, %d rows)\n", *out, title, set.Rows())
	return nil
}

// fileSHA256 returns the hex SHA-256 digest of the regular file at path,
// read under ctx, or "" for a pipe or device, which cannot be read twice.
func fileSHA256(ctx context.Context, path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	if fi, err := f.Stat(); err != nil || !fi.Mode().IsRegular() {
		return "", err
	}
	r := ctxio.NewReader(ctx, f)
	defer r.Close()
	h := sha256.New()
	if _, err := io.Copy(h, r); err != nil {
		if ctx.Err() != nil {
			return "", context.Cause(ctx)
		}
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// oneParagraph joins the lines of a help-text paragraph into one line, for
// a page that wraps text itself.
func oneParagraph(s string) string {
	out := make([]rune, 0, len(s))
	for _, r := range s {
		if r == '\n' {
			r = ' '
		}
		out = append(out, r)
	}
	for len(out) > 0 && out[len(out)-1] == ' ' {
		out = out[:len(out)-1]
	}
	return string(out)
}
