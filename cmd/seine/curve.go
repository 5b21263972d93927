package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strconv"

	"github.com/seine-ml/seine/diag"
	"github.com/seine-ml/seine/internal/chart"
	"github.com/seine-ml/seine/optim"
)

const curveHelp = `Keeps a stratified holdout (-holdout, default 0.25), then trains on growing
stratified subsets of the other rows, of sizes evenly spaced up to all of
them (-steps sizes, default 10), each subset holding the one before. Costs
are mean cross-entropy without the penalty, in nats, on the subset's own
rows (training) and on the holdout.

Along the curve the penalty per row is held at the spec's full-data value:
a subset of k of the n training rows is trained with λ·k/n, since the cost
adds λ/(2m)·Σw² over its m rows; the last point is trained as the spec
says. -spec-penalty applies the spec's λ to every subset instead, which
penalises the small subsets more strongly.

The last line reads the shape as a hint, not a verdict: a large gap between
holdout and training cost that persists at the largest sizes suggests high
variance (more data or a larger penalty may help); both costs high and
close suggests high bias (a larger net or a smaller penalty may help).
"High" is judged against the baseline, the holdout cost of always
answering the class shares. -json writes one object: holdout_rows,
baseline, shape, hint and points (rows, train_cost, holdout_cost,
train_accuracy, holdout_accuracy) and warnings.

Progress goes to standard error, a line per finished fit (a line redrawn
in place on a terminal); -quiet leaves it out. -shard K/N runs only the
sizes i (0-based) with i mod N = K and writes them as JSON, to -out FILE or
standard output; seine merge puts the N parts back together.
`

func runCurve(ctx context.Context, e *env, args []string) error {
	fs := newFlags("curve", e)
	comma := commaFlag(fs)
	specPath := specFlag(fs)
	dataPath := dataFlag(fs, true)
	label := labelFlag(fs, false)
	steps := fs.Int("steps", diag.DefaultSteps, "number of training sizes")
	holdout := fs.Float64("holdout", diag.DefaultHoldout, "fraction of rows in (0, 1) kept out")
	seed := fs.Uint64("seed", 0, "seed of the split, the subsets and the initial params (default the spec's init.seed)")
	iterations := iterationsFlag(fs)
	standardize := standardizeFlag(fs)
	specPenalty := fs.Bool("spec-penalty", false, "train every subset with the spec's λ as written")
	asJSON := jsonFlag(fs, "the curve")
	plot := plotFileFlag(fs, "the curve")
	quiet := quietFlag(fs)
	so := addShardFlags(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := requireFlags("spec", *specPath, "data", *dataPath); err != nil {
		return err
	}
	switch {
	case *steps < 1:
		return usagef("-steps %d: want ≥ 1", *steps)
	case !(*holdout > 0 && *holdout < 1):
		return usagef("-holdout %g: want a fraction in (0, 1)", *holdout)
	case *iterations < 0:
		return usagef("-iterations %d: want ≥ 0", *iterations)
	}
	format, err := plotFlag("-plot", *plot, "spec", *specPath, "data", *dataPath)
	if err != nil {
		return err
	}
	if err := so.check(os.Getenv, *plot, "", "spec", *specPath, "data", *dataPath); err != nil {
		return err
	}
	s, err := loadSpec(ctx, *specPath)
	if err != nil {
		return err
	}
	set, err := loadData(ctx, *dataPath, withComma(dataFor(s, *label), comma))
	if err != nil {
		return err
	}
	pr := progressFor(e, *quiet, "curve", func(f diag.FitDone) string { return fmt.Sprintf("%d rows", f.Rows) })
	c, err := diag.LearningCurve(ctx, s, set, diag.CurveOptions{
		Steps: *steps, Holdout: *holdout, Seed: *seed, NoScale: !*standardize, SpecPenalty: *specPenalty,
		Limits: optim.Limits{Iterations: *iterations}, Shard: so.shard, Progress: pr.fit,
	})
	pr.done()
	if err != nil {
		return err
	}
	name := problemName(s, *dataPath)
	if so.on() {
		for _, w := range c.Warnings {
			fmt.Fprintf(e.stderr, "curve: warning: %s\n", w)
		}
		pp, err := describeProblem(ctx, name, s, *dataPath, set.Rows())
		if err != nil {
			return err
		}
		return writePart(e, so, &part{Command: "curve", Problems: []partProblem{pp}, Settings: settingsOf(fs), Curve: toCurvePart(c)})
	}
	return reportCurve(e, name, c, *specPenalty, outputs{json: *asJSON, plot: *plot, format: format})
}

// reportCurve writes the warnings, the table or JSON and the plot of a
// whole learning curve (run here or merged from parts).
func reportCurve(e *env, name string, c *diag.Curve, specPenalty bool, o outputs) error {
	for _, w := range c.Warnings {
		fmt.Fprintf(e.stderr, "curve: warning: %s\n", w)
	}
	if o.json {
		if err := writeCurveJSON(e.stdout, c); err != nil {
			return err
		}
	} else {
		writeCurveTable(e.stdout, name, c, specPenalty)
	}
	if o.plot != "" {
		cp := chart.CurvePlot{Title: name}
		for _, p := range c.Points {
			cp.Rows = append(cp.Rows, float64(p.Rows))
			cp.Train = append(cp.Train, p.TrainCost)
			cp.Holdout = append(cp.Holdout, p.HoldoutCost)
		}
		if err := writeAtomic(o.plot, func(w io.Writer) error { return cp.Write(w, o.format) }); err != nil {
			return fmt.Errorf("-plot %s: %w", o.plot, err)
		}
	}
	return nil
}

func shapeName(s diag.Shape) string {
	switch s {
	case diag.HighVariance:
		return "high-variance"
	case diag.HighBias:
		return "high-bias"
	}
	return "none"
}

func writeCurveTable(w io.Writer, name string, c *diag.Curve, specPenalty bool) {
	pen := "penalty per row held at the spec's full-data value"
	if specPenalty {
		pen = "the spec's λ on every subset"
	}
	fmt.Fprintf(w, "%s: learning curve; %d holdout rows; %s\n\n", name, c.HoldoutRows, pen)
	rows := [][]string{{"rows", "train cost", "holdout cost", "gap", "train acc", "holdout acc"}}
	for _, p := range c.Points {
		rows = append(rows, []string{
			strconv.Itoa(p.Rows),
			num(p.TrainCost, "%.4f"), num(p.HoldoutCost, "%.4f"), num(p.HoldoutCost-p.TrainCost, "%.4f"),
			num(p.TrainAccuracy, "%.3f"), num(p.HoldoutAccuracy, "%.3f"),
		})
	}
	writeColumns(w, rows, 0, false)
	fmt.Fprintf(w, "\nCosts: cross-entropy without the penalty (nats). Baseline (class shares alone): %.4f.\n", c.Baseline)
	fmt.Fprintf(w, "Hint, not a verdict: %s.\n", c.Shape)
}

type curvePointJSON struct {
	Rows            int     `json:"rows"`
	TrainCost       jsonNum `json:"train_cost"`
	HoldoutCost     jsonNum `json:"holdout_cost"`
	TrainAccuracy   jsonNum `json:"train_accuracy"`
	HoldoutAccuracy jsonNum `json:"holdout_accuracy"`
}

func writeCurveJSON(w io.Writer, c *diag.Curve) error {
	out := struct {
		HoldoutRows int              `json:"holdout_rows"`
		Baseline    jsonNum          `json:"baseline"`
		Shape       string           `json:"shape"`
		Hint        string           `json:"hint"`
		Points      []curvePointJSON `json:"points"`
		Warnings    []string         `json:"warnings"`
	}{HoldoutRows: c.HoldoutRows, Baseline: jsonNum(c.Baseline), Shape: shapeName(c.Shape), Hint: c.Shape.String(),
		Warnings: append([]string{}, c.Warnings...)}
	for _, p := range c.Points {
		out.Points = append(out.Points, curvePointJSON{p.Rows, jsonNum(p.TrainCost), jsonNum(p.HoldoutCost), jsonNum(p.TrainAccuracy), jsonNum(p.HoldoutAccuracy)})
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(out)
}
