package report

import (
	"bytes"
	_ "embed"
	"errors"
	"fmt"
	"html/template"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/seine-ml/seine/diag"
	"github.com/seine-ml/seine/internal/chart"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
)

// ErrPage is wrapped by errors in what a Page holds.
var ErrPage = errors.New("report: cannot write the page")

// Figure is a chart that can draw itself as SVG (every chart of
// internal/chart).
type Figure interface {
	Write(w io.Writer, f chart.Format) error
}

// Data describes the rows the model was scored on.
type Data struct {
	File   string // the file's name as the user gave it
	Rows   int
	SHA256 string // hex digest of the file's bytes; "" when not computed
}

// Page is everything one report shows.
type Page struct {
	Model     *nn.Model
	ModelFile string // the model file's name as the user gave it
	Data      Data
	// Report holds the figures of score.Evaluate of the model on the
	// data, with the decision thresholds of Override or the model's, and
	// its Warnings.
	Report *score.Report
	// Override is the threshold given instead of the model's operating
	// thresholds (seine report -threshold); 0 means the model's decision.
	Override float64
	// Importance is the permutation importance of each input on the
	// data; nil leaves the section saying it was not measured.
	Importance *diag.Importance
	// ROC, PR and Reliability are drawn as inline SVG; a nil one is left
	// out with a note.
	ROC, PR, Reliability Figure
	// Trace draws the training trace; nil says that the model holds none.
	Trace Figure
	// Cautions are paragraphs shown in their own section, in order.
	Cautions []string
	// Version names the tool that wrote the page, e.g. "seine 0.2.0".
	Version string
}

// Format writes the figure v of the given -json key as the page shows it:
// accuracy as a percentage with two decimals ("97.33%"), every other
// figure with four decimals ("0.1234"), and an undefined figure (nil or
// NaN) as "–".
func Format(key string, v *float64) string {
	if v == nil || math.IsNaN(*v) {
		return "–"
	}
	if key == "accuracy" {
		return fmt.Sprintf("%.2f%%", 100**v)
	}
	return fmt.Sprintf("%.4f", *v)
}

// fig is one figure on the page.
type fig struct {
	ID    string // element id, "" for none
	Key   string // data-figure: the -json key
	Label string
	Note  string
	Text  string // as shown
	Value string // data-value: shortest text that reads back to the float64; "" when undefined
}

func newFig(id, key, label, note string, v *float64) fig {
	f := fig{ID: id, Key: key, Label: label, Note: note, Text: Format(key, v)}
	if v != nil && !math.IsNaN(*v) {
		f.Value = strconv.FormatFloat(*v, 'g', -1, 64)
	}
	return f
}

func ptr(v float64) *float64 { return &v }

// classRow is one row of the metric table.
type classRow struct {
	Name            string
	Rows, Predicted int
	Figs            []fig
}

// confusionRow is one row of the confusion matrix.
type confusionRow struct {
	Name  string
	Cells []confusionCell
	Total int
}

type confusionCell struct {
	Predicted string
	Count     int
	Shade     int // 0–5, darker for a larger share of the row
	Diagonal  bool
}

// bin is one reliability bin as the table shows it.
type bin struct {
	Range, Count, Accuracy, Confidence, Gap string
}

// impRow is one input in the importance table and chart.
type impRow struct {
	Rank           int
	Name, Type     string
	Rise, Fall     []fig   // mean, SD, min, max
	BarY, MidY     float64 // chart: top of the bar and its middle, px
	CapY1, CapY2   float64 // whisker caps
	TextY          float64 // baseline of the labels
	BarX, BarW     float64
	WhiskX1        float64
	WhiskX2        float64
	MeanText       string
	TextX          float64
	NegativeOrZero bool
}

// kv is one line of a two-column table.
type kv struct{ Key, Value string }

// operating is one class's operating threshold with its holdout figures.
type operating struct {
	Class, Threshold, Precision, Recall, F1 string
}

// view is what the template sees.
type view struct {
	Title, ModelFile, Version string
	Data                      Data
	Multilabel                bool
	Headline                  []fig
	Warnings                  []string
	PerClass                  []classRow
	PerClassHead              []string
	Confusion                 []confusionRow
	ConfusionHead             []string
	ROC, PR, Reliability      template.HTML
	Trace                     template.HTML
	ECE                       fig
	ECEHoldout                []kv
	Bins                      []bin
	Importance                *impView
	Decision                  []kv
	Operating                 []operating
	Training                  []kv
	Spec                      string
	Cautions                  []string
}

// impView is the importance section.
type impView struct {
	Repeats       int
	Seed          uint64
	BaseCE        fig
	Rows          []impRow
	Width, Height int
	AxisX         float64 // x of zero
	PlotBottom    float64 // y below the last bar
	Ticks         []tick
	LabelW        int
}

type tick struct {
	X    float64
	Text string
}

//go:embed page.html.tmpl
var pageText string

var page = template.Must(template.New("page").Parse(pageText))

// Write writes the page p as one HTML document to w.
func Write(w io.Writer, p *Page) error {
	v, err := build(p)
	if err != nil {
		return err
	}
	return page.Execute(w, v)
}

func build(p *Page) (*view, error) {
	m, r := p.Model, p.Report
	if m == nil || r == nil {
		return nil, fmt.Errorf("%w: no model or no report", ErrPage)
	}
	if r.Ranking == nil || r.Reliability == nil {
		return nil, fmt.Errorf("%w: the report lacks its curves (use score.Evaluate)", ErrPage)
	}
	v := &view{Title: m.Spec().Name, ModelFile: p.ModelFile, Version: p.Version, Data: p.Data, Multilabel: r.Multilabel,
		Warnings: r.Warnings, Cautions: p.Cautions}
	if v.Title == "" {
		v.Title = "model"
	}
	if r.Multilabel {
		v.Headline = append(v.Headline, newFig("accuracy", "accuracy", "exact sets", "rows with every class right", ptr(r.Accuracy)),
			newFig("hamming-loss", "hamming_loss", "Hamming loss", "share of (row, class) decisions wrong", r.HammingLoss))
	} else {
		right := int(math.Round(r.Accuracy * float64(r.Rows)))
		v.Headline = append(v.Headline, newFig("accuracy", "accuracy", "accuracy", fmt.Sprintf("%d of %d rows right", right, r.Rows), ptr(r.Accuracy)))
	}
	v.ECE = newFig("ece", "ece", "ECE", "expected calibration error, 10 bins", ptr(r.ECE))
	v.Headline = append(v.Headline,
		newFig("cross-entropy", "cross_entropy", "cross-entropy", "nats per row", ptr(r.CrossEntropy)),
		newFig("macro-f1", "macro_f1", "macro F1", "mean of the class F1 scores", ptr(r.MacroF1)),
		newFig("macro-roc-auc", "macro_roc_auc", "macro ROC AUC", "mean one-vs-rest area under the ROC curve", r.MacroROCAUC),
		newFig("macro-ap", "macro_average_precision", "macro AP", "mean average precision", r.MacroAveragePrecision),
		v.ECE)

	v.PerClassHead = []string{"precision", "recall", "F1", "ROC AUC", "AP", "threshold"}
	for _, c := range r.PerClass {
		v.PerClass = append(v.PerClass, classRow{Name: c.Name, Rows: c.Rows, Predicted: c.Predicted, Figs: []fig{
			newFig("", "precision", "", "", ptr(c.Precision)),
			newFig("", "recall", "", "", ptr(c.Recall)),
			newFig("", "f1", "", "", ptr(c.F1)),
			newFig("", "roc_auc", "", "", c.ROCAUC),
			newFig("", "average_precision", "", "", c.AveragePrecision),
			newFig("", "threshold", "", "", c.Threshold),
		}})
	}
	if r.Confusion != nil {
		v.ConfusionHead = r.Classes
		for i, row := range r.Confusion {
			cr := confusionRow{Name: r.Classes[i]}
			for _, n := range row {
				cr.Total += n
			}
			for j, n := range row {
				shade := 0
				if cr.Total > 0 && n > 0 {
					shade = 1 + int(4.999*float64(n)/float64(cr.Total))
				}
				cr.Cells = append(cr.Cells, confusionCell{Predicted: r.Classes[j], Count: n, Shade: shade, Diagonal: i == j})
			}
			v.Confusion = append(v.Confusion, cr)
		}
	}
	var err error
	for _, f := range []struct {
		dst *template.HTML
		fig Figure
	}{{&v.ROC, p.ROC}, {&v.PR, p.PR}, {&v.Reliability, p.Reliability}, {&v.Trace, p.Trace}} {
		if f.fig == nil {
			continue
		}
		if *f.dst, err = inlineSVG(f.fig); err != nil {
			return nil, err
		}
	}
	for _, b := range r.Reliability.Bins {
		row := bin{Range: fmt.Sprintf("%.1f – %.1f", b.Lo, b.Hi), Count: strconv.Itoa(b.Count), Accuracy: "–", Confidence: "–", Gap: "–"}
		if b.Count > 0 {
			row.Accuracy, row.Confidence = fmt.Sprintf("%.4f", b.Accuracy), fmt.Sprintf("%.4f", b.Confidence)
			row.Gap = fmt.Sprintf("%+.4f", b.Accuracy-b.Confidence)
		}
		v.Bins = append(v.Bins, row)
	}
	sm := m.Summary()
	if finite(sm.HoldoutECEBefore) {
		v.ECEHoldout = append(v.ECEHoldout, kv{"holdout ECE before temperature", fmt.Sprintf("%.4f", sm.HoldoutECEBefore)})
	}
	if finite(sm.HoldoutECE) {
		v.ECEHoldout = append(v.ECEHoldout, kv{"holdout ECE with the model's temperature", fmt.Sprintf("%.4f", sm.HoldoutECE)})
	}
	if p.Importance != nil {
		v.Importance = importanceView(p.Importance)
	}
	v.Decision, v.Operating = decision(m, p.Override)
	v.Training = training(m)
	var sb strings.Builder
	if err := m.Spec().WriteYAML(&sb); err != nil {
		return nil, fmt.Errorf("%w: the model's spec: %w", ErrPage, err)
	}
	v.Spec = sb.String()
	return v, nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// inlineSVG draws f as SVG and returns its <svg> element without the XML
// declaration and comments in front, to be placed in the page as is. The
// charts escape every text they draw.
func inlineSVG(f Figure) (template.HTML, error) {
	var b bytes.Buffer
	if err := f.Write(&b, chart.SVG); err != nil {
		return "", fmt.Errorf("%w: drawing a chart: %w", ErrPage, err)
	}
	s := b.String()
	i := strings.Index(s, "<svg")
	if i < 0 || strings.Contains(strings.ToLower(s), "<script") {
		return "", fmt.Errorf("%w: a chart is not a plain SVG document", ErrPage)
	}
	return template.HTML(s[i:]), nil // the charts' own output; they escape every text
}

// decision describes how the model decides and the operating points
// chosen on holdout rows.
func decision(m *nn.Model, override float64) ([]kv, []operating) {
	d := m.Decision()
	var out []kv
	sigmoid := m.Spec().Output.Activation == spec.Sigmoid
	switch {
	case !sigmoid:
		out = append(out, kv{"output", "softmax: each row is given its most probable class (operating thresholds apply to sigmoid outputs only)"})
	case m.Multilabel():
		out = append(out, kv{"output", "sigmoid, multi-label: each class is present when its probability is at least its threshold"})
	default:
		out = append(out, kv{"output", fmt.Sprintf("sigmoid, binary: a row is %q when the probability of %q is at least the threshold", m.Classes()[1], m.Classes()[1])})
	}
	if t := d.Temperature; t != 0 && t != 1 {
		out = append(out, kv{"temperature", fmt.Sprintf("T = %.4g: the logits are divided by T before the output activation, fitted on the holdout rows (Guo et al. 2017)", t)})
	} else {
		out = append(out, kv{"temperature", "none (T = 1)"})
	}
	if sigmoid {
		switch {
		case d.Thresholds != nil:
			ts := make([]string, len(d.Thresholds))
			for i, t := range d.Thresholds {
				ts[i] = fmt.Sprintf("%.4g", t)
			}
			out = append(out, kv{"operating thresholds", strings.Join(ts, ", ")})
		case m.Multilabel():
			out = append(out, kv{"operating thresholds", "none: 0.5 for every class"})
		default:
			out = append(out, kv{"operating thresholds", "none: the more probable class"})
		}
		if d.Rule != "" {
			rule := d.Rule
			if d.Target != 0 {
				rule = fmt.Sprintf("%s, target %g", rule, d.Target)
			}
			out = append(out, kv{"chosen by", rule + ", on the holdout rows"})
		}
	}
	if override != 0 {
		out = append(out, kv{"in this report", fmt.Sprintf("threshold %g given in place of the model's", override)})
	}
	var ops []operating
	for _, o := range m.Summary().Operating {
		ops = append(ops, operating{Class: o.Class, Threshold: fmt.Sprintf("%.4g", o.Threshold),
			Precision: fmt.Sprintf("%.4f", o.Precision), Recall: fmt.Sprintf("%.4f", o.Recall), F1: fmt.Sprintf("%.4f", o.F1)})
	}
	return out, ops
}

// training lists the model's training summary.
func training(m *nn.Model) []kv {
	sm := m.Summary()
	num := func(v float64) string {
		if !finite(v) {
			return "–"
		}
		return fmt.Sprintf("%.4f", v)
	}
	out := []kv{
		{"method", orDash(sm.Method)},
		{"stopped", orDash(sm.Status.String())},
		{"iterations", strconv.Itoa(sm.Iterations)},
		{"evaluations", strconv.FormatFloat(sm.Evaluations, 'g', 6, 64)},
		{"time", fmt.Sprintf("%.2f s", sm.Elapsed.Seconds())},
		{"final cost (with penalty)", num(sm.Cost)},
		{"training rows", strconv.Itoa(sm.TrainRows)},
		{"training accuracy", Format("accuracy", ptr(sm.TrainAccuracy))},
	}
	if sm.HoldoutRows > 0 {
		out = append(out, kv{"holdout rows", strconv.Itoa(sm.HoldoutRows)},
			kv{"holdout cross-entropy", num(sm.HoldoutCost)},
			kv{"holdout accuracy", Format("accuracy", ptr(sm.HoldoutAccuracy))})
	} else {
		out = append(out, kv{"holdout rows", "none"})
	}
	if sm.ClassWeights != nil {
		ws := make([]string, len(sm.ClassWeights))
		for i, w := range sm.ClassWeights {
			ws[i] = fmt.Sprintf("%s %.4g", m.Classes()[i], w)
		}
		out = append(out, kv{"class weights", strings.Join(ws, ", ")})
	} else {
		out = append(out, kv{"class weights", "none (every row counts the same)"})
	}
	out = append(out, kv{"initialisation seed", strconv.FormatUint(sm.Seed, 10)}, kv{"trained by", library(sm.Library)})
	return out
}

// library names the seine version that trained a model.
func library(v string) string {
	if v == "" {
		return "–"
	}
	return "seine " + v
}

func orDash(s string) string {
	if s == "" {
		return "–"
	}
	return s
}

// importanceView lays out the importance table and its bar chart: one bar
// per input, ranked, from 0 to the mean rise, with a whisker from the
// smallest to the largest rise over the repeats.
func importanceView(im *diag.Importance) *impView {
	const (
		labelW = 180
		plotW  = 380
		rowH   = 22
		top    = 8
	)
	v := &impView{Repeats: im.Repeats, Seed: im.Seed, LabelW: labelW,
		BaseCE: newFig("", "cross_entropy", "", "", ptr(im.CrossEntropy))}
	lo, hi := 0.0, 0.0
	for _, in := range im.Inputs {
		lo, hi = math.Min(lo, in.CrossEntropyRise.Min), math.Max(hi, in.CrossEntropyRise.Max)
	}
	if hi-lo <= 0 {
		hi = 1
	}
	x := func(r float64) float64 { return labelW + plotW*(r-lo)/(hi-lo) }
	v.AxisX = x(0)
	for i, j := range im.Ranked() {
		in := im.Inputs[j]
		ce, acc := in.CrossEntropyRise, in.AccuracyFall
		y := float64(top + i*rowH)
		row := impRow{Rank: i + 1, Name: in.Name, Type: in.Type.String(), BarY: y + 3, MidY: y + 10, CapY1: y + 5, CapY2: y + 15, TextY: y + 14,
			Rise: []fig{newFig("", "rise_mean", "", "", ptr(ce.Mean)), newFig("", "rise_sd", "", "", ptr(ce.SD)),
				newFig("", "rise_min", "", "", ptr(ce.Min)), newFig("", "rise_max", "", "", ptr(ce.Max))},
			Fall:    []fig{newFig("", "fall_mean", "", "", ptr(acc.Mean)), newFig("", "fall_sd", "", "", ptr(acc.SD))},
			WhiskX1: x(ce.Min), WhiskX2: x(ce.Max), MeanText: fmt.Sprintf("%.3f", ce.Mean), NegativeOrZero: ce.Mean <= 0}
		row.BarX, row.BarW = math.Min(x(0), x(ce.Mean)), math.Abs(x(ce.Mean)-x(0))
		row.TextX = math.Max(x(ce.Max), x(0)) + 6
		v.Rows = append(v.Rows, row)
	}
	v.Width = labelW + plotW + 70
	v.PlotBottom = float64(top + len(im.Inputs)*rowH + 4)
	v.Height = top + len(im.Inputs)*rowH + 26
	for _, t := range niceTicks(lo, hi) {
		v.Ticks = append(v.Ticks, tick{X: x(t), Text: strconv.FormatFloat(t, 'g', 3, 64)})
	}
	return v
}

// niceTicks returns about five round values in [lo, hi] (steps of 1, 2
// or 5 times a power of ten; common practice for axis labels).
func niceTicks(lo, hi float64) []float64 {
	span := hi - lo
	step := math.Pow(10, math.Floor(math.Log10(span/5)))
	for _, f := range []float64{1, 2, 5, 10} {
		if span/(step*f) <= 6 {
			step *= f
			break
		}
	}
	var out []float64
	for t := math.Ceil(lo/step) * step; t <= hi+step*1e-9; t += step {
		if math.Abs(t) < step*1e-9 {
			t = 0
		}
		out = append(out, t)
	}
	return out
}
