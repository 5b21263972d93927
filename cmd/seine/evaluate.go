package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/internal/chart"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/score"
)

const evaluateHelp = `The data file's feature columns are picked by the model's feature names
when it has them (else it must have the model's number of feature columns
besides the label), and its labels must be among the model's classes.

The text report gives the headline figures, one line per class (rows that
truly carry the class, rows the model assigned to it, precision, recall,
F1) and, for single-label models, the confusion matrix with true classes
down the side and predicted classes across. -json writes the same figures
as one JSON object instead: rows, accuracy, cross_entropy, macro_f1,
classes, confusion (rows = true class), per_class (class, rows, predicted,
precision, recall, f1) and, for multi-label models, hamming_loss and
threshold.

For multi-label models the score is the exact-set accuracy, the share of
rows whose whole set of classes is right (JSON "accuracy", as train's
summary calls it too), each class is scored as its own yes/no question, and
-threshold (default the model's operating thresholds, else 0.5) is the
probability at or above which a class counts as present. A binary sigmoid
model with an operating threshold decides the second class when its
probability is at least the threshold; softmax models take the most
probable class.

Ranking and calibration: per class (one-vs-rest) the area under the ROC
curve (ties count one half, as the Mann–Whitney statistic) and the average
precision (the step sum of precision over recall, not interpolated), their
macro means over the classes that have both positive and negative rows, and
the expected calibration error over 10 equal-width bins of the predicted
probability (Guo et al. 2017). -json adds per_class[].roc_auc,
per_class[].average_precision, per_class[].threshold, macro_roc_auc,
macro_average_precision and ece (null where a figure is undefined). -roc,
-pr and -reliability draw the curves, with the operating point marked.

` + decisionCaution

// decisionCaution is the caution printed with evaluate's help and in the
// report (issue 11's wording).
const decisionCaution = `A threshold trades one kind of error for another; the right trade depends
on the cost of each error in your setting. Where a model's decisions affect
people (access, accounts, credit, health), check error rates per group,
keep a person able to review and overturn a decision, and follow the rules
that apply locally. Calibration measured on one holdout set holds only
while the data look like that set.
`

func runEvaluate(ctx context.Context, e *env, args []string) error {
	fs := newFlags("evaluate", e)
	comma := commaFlag(fs)
	modelPath := modelFlag(fs)
	dataPath := dataFlag(fs, true)
	label := labelFlag(fs, false)
	asJSON := jsonFlag(fs, "the report")
	plot := plotFileFlag(fs, "the confusion matrix")
	rocFile := fs.String("roc", "", "also draw the ROC curves, operating points marked, to `FILE`.png or FILE.svg")
	prFile := fs.String("pr", "", "also draw the precision–recall curves, operating points marked, to `FILE`.png or FILE.svg")
	relFile := fs.String("reliability", "", "also draw the reliability diagram to `FILE`.png or FILE.svg")
	threshold := thresholdFlag(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := requireFlags("model", *modelPath, "data", *dataPath); err != nil {
		return err
	}
	if err := checkThreshold(*threshold); err != nil {
		return err
	}
	var format chart.Format
	if *plot != "" {
		var err error
		if format, err = chart.FormatOf(*plot); err != nil {
			return usagef("-plot %s: want a file name ending in .png or .svg", *plot)
		}
		if err := refuseOverwrite("-plot", *plot, "model", *modelPath, "data", *dataPath); err != nil {
			return err
		}
	}
	for _, pl := range []struct{ flag, path string }{{"-roc", *rocFile}, {"-pr", *prFile}, {"-reliability", *relFile}} {
		if pl.path == "" {
			continue
		}
		if _, err := chart.FormatOf(pl.path); err != nil {
			return usagef("%s %s: want a file name ending in .png or .svg", pl.flag, pl.path)
		}
		if err := refuseOverwrite(pl.flag, pl.path, "model", *modelPath, "data", *dataPath); err != nil {
			return err
		}
	}
	m, thresholds, err := loadDecidingModel(ctx, *modelPath, *threshold)
	if err != nil {
		return err
	}
	if *plot != "" && m.Multilabel() {
		return usagef("-plot: a multi-label model has no confusion matrix (each class is its own yes/no question)")
	}
	opt := withComma(dataForModel(m, *label, false), comma)
	set, err := loadData(ctx, *dataPath, opt)
	if err != nil {
		return noLabelHint(err, *dataPath, opt.Label)
	}
	rep, err := evaluate(m, set, thresholds)
	if err != nil {
		return prefixLines(*dataPath, err)
	}
	rep.Warnings = score.Warnings(rep, baseName(*dataPath), tilted(m))
	for _, w := range rep.Warnings {
		fmt.Fprintf(e.stderr, "seine evaluate: warning: %s\n", w)
	}
	title := fmt.Sprintf("%s on %s", displayName(m), baseName(*dataPath))
	if *plot != "" {
		err := writeAtomic(*plot, func(w io.Writer) error {
			return chart.ConfusionPlot(w, format, title, rep.Classes, rep.Confusion)
		})
		if err != nil {
			return fmt.Errorf("-plot %s: %w", *plot, err)
		}
	}
	for _, pl := range []struct {
		flag, path string
		chart      chartWriter
	}{{"-roc", *rocFile, rocPlot(rep, title)}, {"-pr", *prFile, prPlot(rep, title)}, {"-reliability", *relFile, reliabilityPlot(rep, title)}} {
		if pl.path == "" {
			continue
		}
		f, _ := chart.FormatOf(pl.path)
		if err := writeAtomic(pl.path, func(w io.Writer) error { return pl.chart.Write(w, f) }); err != nil {
			return fmt.Errorf("%s %s: %w", pl.flag, pl.path, err)
		}
	}
	if *asJSON {
		return json.NewEncoder(e.stdout).Encode(rep)
	}
	writeReport(e.stdout, *modelPath, *dataPath, m, rep)
	return nil
}

// dataForModel returns the CSV options that read a data file for model m:
// its inputs by name with their types and missing rules, its missing
// tokens, classes and multi-label setting, and the label column the model
// was trained with unless label names another.
func dataForModel(m *nn.Model, label string, noLabel bool) data.CSVOptions {
	if label == "" {
		label = m.Label()
	}
	enc := m.Encoder()
	return data.CSVOptions{Label: label, NoLabel: noLabel, Classes: m.Classes(), Multilabel: m.Multilabel(),
		Columns: enc.Columns(), MissingTokens: enc.MissingTokens()}
}

// evaluate scores m on the labelled rows of set.
func evaluate(m *nn.Model, set *data.Set, thresholds []float64) (*score.Report, error) {
	p, err := m.ProbabilitiesSet(set)
	if err != nil {
		return nil, err
	}
	return score.Evaluate(p, set.Y, m.Classes(), score.Options{Multilabel: m.Multilabel(), Thresholds: thresholds})
}

func displayName(m *nn.Model) string {
	if m.Spec().Name != "" {
		return m.Spec().Name
	}
	return "model"
}

func baseName(path string) string {
	if i := strings.LastIndexAny(path, `/\`); i >= 0 {
		return path[i+1:]
	}
	return path
}

// writeReport writes the text report of evaluate. Layout:
//
//	session-triage (m.seine.json) on sessions.csv: 3000 rows
//
//	  accuracy        96.53%   2896 of 3000 rows right
//	  cross-entropy   0.1876   nats per row
//	  macro F1        0.9602   mean of the class F1 scores
//
//	  class     rows  predicted  precision  recall      F1
//	  ...
//
//	  confusion: true class down, predicted class across
//	  ...
func writeReport(w io.Writer, modelPath, dataPath string, m *nn.Model, r *score.Report) {
	fmt.Fprintf(w, "%s (%s) on %s: %d rows\n\n", displayName(m), baseName(modelPath), baseName(dataPath), r.Rows)
	right := int(math.Round(r.Accuracy * float64(r.Rows)))
	if r.Multilabel {
		fmt.Fprintf(w, "  exact-set acc.  %6.2f%%  %d of %d rows with every class right (exact-set accuracy)\n", 100*r.Accuracy, right, r.Rows)
		fmt.Fprintf(w, "  Hamming loss    %7.4f  share of (row, class) decisions wrong, threshold %g\n", *r.HammingLoss, r.Threshold)
	} else {
		fmt.Fprintf(w, "  accuracy        %6.2f%%  %d of %d rows right\n", 100*r.Accuracy, right, r.Rows)
	}
	fmt.Fprintf(w, "  cross-entropy   %7.4f  nats per row\n", r.CrossEntropy)
	fmt.Fprintf(w, "  macro F1        %7.4f  mean of the class F1 scores\n", r.MacroF1)
	fmt.Fprintf(w, "  macro ROC area  %7s  mean one-vs-rest area under the ROC curve\n", optText(r.MacroROCAUC))
	fmt.Fprintf(w, "  macro AP        %7s  mean average precision\n", optText(r.MacroAveragePrecision))
	fmt.Fprintf(w, "  ECE             %7.4f  expected calibration error, 10 bins\n\n", r.ECE)

	cw := len("class")
	for _, c := range r.Classes {
		cw = max(cw, len([]rune(c)))
	}
	fmt.Fprintf(w, "  %-*s  %6s  %9s  %9s  %6s  %6s  %7s  %6s  %9s\n", cw, "class", "rows", "predicted", "precision", "recall", "F1", "ROC AUC", "AP", "threshold")
	for _, c := range r.PerClass {
		th := "-"
		if c.Threshold != nil {
			th = fmt.Sprintf("%.4g", *c.Threshold)
		}
		fmt.Fprintf(w, "  %s  %6d  %9d  %9.4f  %6.4f  %6.4f  %7s  %6s  %9s\n", pad(c.Name, cw), c.Rows, c.Predicted, c.Precision, c.Recall, c.F1, optText(c.ROCAUC), optText(c.AveragePrecision), th)
	}
	if r.Confusion == nil {
		return
	}
	fmt.Fprintf(w, "\n  confusion: true class down, predicted class across\n")
	colw := make([]int, len(r.Classes))
	for j, c := range r.Classes {
		colw[j] = len([]rune(c))
		for i := range r.Confusion {
			colw[j] = max(colw[j], len(fmt.Sprint(r.Confusion[i][j])))
		}
	}
	fmt.Fprintf(w, "  %s", pad("", cw))
	for j, c := range r.Classes {
		fmt.Fprintf(w, "  %*s", colw[j]+len(c)-len([]rune(c)), c)
	}
	fmt.Fprintln(w)
	for i, row := range r.Confusion {
		fmt.Fprintf(w, "  %s", pad(r.Classes[i], cw))
		for j, n := range row {
			fmt.Fprintf(w, "  %*d", colw[j], n)
		}
		fmt.Fprintln(w)
	}
}

// optText writes a figure that may be undefined (nil: a class without
// positive or negative rows) with four decimals, or "-".
func optText(v *float64) string {
	if v == nil {
		return "-"
	}
	return fmt.Sprintf("%.4f", *v)
}

// pad left-aligns s in a field of width runes.
func pad(s string, width int) string {
	if n := len([]rune(s)); n < width {
		return s + strings.Repeat(" ", width-n)
	}
	return s
}

// tilted reports whether m's decisions lean away from the most probable
// class on purpose: class weights in its cost or operating thresholds.
func tilted(m *nn.Model) bool {
	return m.Summary().ClassWeights != nil || m.Decision().Thresholds != nil
}

// noLabelHint turns "no label column" into a plain statement that points to
// predict: evaluate scores a model against labelled rows, and a file
// without labels is for prediction.
func noLabelHint(err error, path, label string) error {
	var de *data.Error
	if label == "" || !errors.Is(err, data.ErrMissingColumn) || !errors.As(err, &de) || de.Column != label {
		return err
	}
	return fmt.Errorf("%s has no label column %q, so there is nothing to score the model against; to classify unlabelled rows use seine predict (or name the label column with -label): %w", path, label, err)
}
