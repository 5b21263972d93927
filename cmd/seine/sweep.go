package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"github.com/seine-ml/seine/diag"
	"github.com/seine-ml/seine/internal/chart"
	"github.com/seine-ml/seine/optim"
)

const sweepHelp = `Trains the spec at each penalty strength λ of -l2 (penalty.l2; every other
setting as in the spec) with k-fold stratified cross-validation (-folds,
default 5) or one stratified holdout split (-holdout), the same folds and
initial params for every λ. Costs are mean cross-entropy without the
penalty, in nats, on the training rows of each fit and on its validation
rows, so that both read on one scale; accuracy is the share of rows
classified right. Each figure is the mean over the folds with the lowest
and highest fold in brackets. The strength with the lowest mean
validation cost is named at the end.

-units sweeps the units of the first hidden layer the same way, at the best
λ found when -l2 is given too, else at the spec's λ. -plot draws validation
and training cost against λ (log axis, λ = 0 at the left edge), with the
fold range as error bars; with -units as well, the units sweep goes to FILE
with "-units" before the extension. -json writes an array with one object
per sweep: param ("l2" or "units"), folds, holdout, best (index), best_value,
points (l2, units, train_cost, valid_cost, train_accuracy,
valid_accuracy, each {mean, sd, min, max}) and warnings.

A warning names a best value at the edge of the grid, the lowest λ or unit
count (unless 0 or 1) or the highest: the optimum may lie beyond it, so
extend the list. Progress goes to standard error, a line per finished fit
(a line redrawn in place on a terminal); -quiet leaves it out.

-shard K/N runs only the fits i (value × fold, see seine help merge) with
i mod N = K and writes them as JSON, to -out FILE or standard output;
seine merge puts the N parts back together. -shard takes -l2 or -units,
not both, since the units sweep runs at the best λ of the whole -l2 sweep.
`

func runSweep(ctx context.Context, e *env, args []string) error {
	fs := newFlags("sweep", e)
	comma := commaFlag(fs)
	specPath := specFlag(fs)
	dataPath := dataFlag(fs, true)
	label := labelFlag(fs, false)
	l2List := fs.String("l2", "", "comma-separated penalty strengths λ ≥ 0, e.g. 0,0.001,0.01,0.1,1,10")
	unitsList := fs.String("units", "", "comma-separated unit counts of the first hidden layer, e.g. 8,16,32")
	folds := fs.Int("folds", 0, "number `K` ≥ 2 of stratified folds (default 5 unless -holdout)")
	holdout := fs.Float64("holdout", 0, "validate on one stratified split with this fraction of rows instead of folds")
	seed := fs.Uint64("seed", 0, "seed of the folds and the initial params (default the spec's init.seed)")
	iterations := iterationsFlag(fs)
	standardize := standardizeFlag(fs)
	asJSON := jsonFlag(fs, "the sweeps")
	plot := plotFileFlag(fs, "cost against λ")
	quiet := quietFlag(fs)
	so := addShardFlags(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := requireFlags("spec", *specPath, "data", *dataPath); err != nil {
		return err
	}
	if *l2List == "" && *unitsList == "" {
		return usagef("give -l2 LIST, -units LIST or both")
	}
	lambdas, err := parseFloats("-l2", *l2List)
	if err != nil {
		return err
	}
	for i, l := range lambdas {
		if !(l >= 0) || math.IsInf(l, 1) {
			return usagef("-l2: item %d is %g; want a finite number ≥ 0", i+1, l)
		}
	}
	units, err := parseInts("-units", *unitsList)
	if err != nil {
		return err
	}
	switch {
	case *folds != 0 && *holdout != 0:
		return usagef("give -folds or -holdout, not both")
	case *folds < 0 || *folds == 1:
		return usagef("-folds %d: want ≥ 2", *folds)
	case *holdout != 0 && !(*holdout > 0 && *holdout < 1):
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
	if so.on() && len(lambdas) > 0 && len(units) > 0 {
		return usagef("-shard: give -l2 or -units, not both (the units sweep runs at the best λ, known only once the -l2 sweep is merged)")
	}
	s, err := loadSpec(ctx, *specPath)
	if err != nil {
		return err
	}
	if len(units) > 0 && len(s.Hidden) == 0 {
		return usagef("-units: %s has no hidden layer whose units could vary", *specPath)
	}
	set, err := loadData(ctx, *dataPath, withComma(dataFor(s, *label), comma))
	if err != nil {
		return err
	}
	cfg := diag.SweepOptions{
		Folds: *folds, Holdout: *holdout, Seed: *seed, NoScale: !*standardize,
		Limits: optim.Limits{Iterations: *iterations}, Shard: so.shard,
	}
	name := problemName(s, *dataPath)
	var sweeps []*diag.Sweep
	if len(lambdas) > 0 {
		pr := progressFor(e, *quiet, "sweep", func(f diag.FitDone) string { return fitLabel("λ = "+strconv.FormatFloat(f.Lambda, 'g', -1, 64), f) })
		cfg.Progress = pr.fit
		sw, err := diag.SweepPenalty(ctx, s, set, lambdas, cfg)
		pr.done()
		if err != nil {
			return err
		}
		sweeps = append(sweeps, sw)
	}
	if len(units) > 0 {
		su := s
		if len(sweeps) > 0 {
			su = s.Clone()
			su.Penalty.L2 = sweeps[0].Points[sweeps[0].Best].Lambda
		}
		pr := progressFor(e, *quiet, "sweep", func(f diag.FitDone) string { return fitLabel(fmt.Sprintf("%d units", f.Units), f) })
		cfg.Progress = pr.fit
		sw, err := diag.SweepUnits(ctx, su, set, units, cfg)
		pr.done()
		if err != nil {
			return err
		}
		sweeps = append(sweeps, sw)
	}
	if so.on() {
		for _, w := range sweeps[0].Warnings {
			fmt.Fprintf(e.stderr, "sweep: warning: %s\n", w)
		}
		pp, err := describeProblem(ctx, name, s, *dataPath, set.Rows())
		if err != nil {
			return err
		}
		settings := settingsOf(fs)
		settings["l2"], settings["units"] = floatList(lambdas), intList(units)
		return writePart(e, so, &part{Command: "sweep", Problems: []partProblem{pp}, Settings: settings, Sweep: toSweepPart(sweeps[0])})
	}
	return reportSweeps(e, name, set.Rows(), sweeps, outputs{json: *asJSON, plot: *plot, format: format})
}

// fitLabel names a sweep's fit: its value and, with folds, the fold.
func fitLabel(value string, f diag.FitDone) string {
	if f.Folds > 1 {
		return fmt.Sprintf("%s, fold %d/%d", value, f.Fold+1, f.Folds)
	}
	return value
}

// outputs are what a sweep, comparison or curve writes besides its table.
type outputs struct {
	json   bool
	plot   string
	format chart.Format
	trace  string // compare only
}

// reportSweeps writes the warnings, the table or JSON and the plots of
// whole sweeps (run here or merged from parts).
func reportSweeps(e *env, name string, rows int, sweeps []*diag.Sweep, o outputs) error {
	warnings := make([][]string, len(sweeps))
	for i, sw := range sweeps {
		warnings[i] = slices.Clone(sw.Warnings)
		if w := edgeWarning(sw); w != "" {
			warnings[i] = append(warnings[i], w)
		}
		for _, w := range warnings[i] {
			fmt.Fprintf(e.stderr, "sweep: warning: %s\n", w)
		}
	}
	if o.json {
		if err := writeSweepJSON(e.stdout, sweeps, warnings); err != nil {
			return err
		}
	} else {
		for i, sw := range sweeps {
			if i > 0 {
				fmt.Fprintln(e.stdout)
			}
			writeSweepTable(e.stdout, name, rows, sw)
		}
	}
	if o.plot != "" {
		for i, sw := range sweeps {
			path := o.plot
			if i > 0 {
				path = suffixed(o.plot, "-units")
			}
			sp := sweepPlot(name, sw)
			if err := writeAtomic(path, func(w io.Writer) error { return sp.Write(w, o.format) }); err != nil {
				return fmt.Errorf("-plot %s: %w", path, err)
			}
		}
	}
	return nil
}

// edgeWarning says when the best value of a sweep is the lowest or the
// highest of its grid, so that the optimum may lie beyond it; not at a
// lower end that cannot be extended (λ = 0, one unit).
func edgeWarning(sw *diag.Sweep) string {
	if len(sw.Points) < 2 {
		return ""
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range sw.Points {
		x := sweepX(sw, p)
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	best := sweepX(sw, sw.Points[sw.Best])
	what, flagName, floor := "λ", "-l2", 0.0
	if sw.Param == diag.HiddenUnits {
		what, flagName, floor = "units", "-units", 1
	}
	text := strconv.FormatFloat(best, 'g', -1, 64)
	switch {
	case best == hi:
		return fmt.Sprintf("the lowest validation cost is at %s = %s, the highest value of the grid; the best may lie above it: extend %s", what, text, flagName)
	case best == lo && best > floor:
		return fmt.Sprintf("the lowest validation cost is at %s = %s, the lowest value of the grid; the best may lie below it: extend %s", what, text, flagName)
	}
	return ""
}

// parseFloats reads a comma-separated list of numbers; "" gives nil.
func parseFloats(flagName, list string) ([]float64, error) {
	if strings.TrimSpace(list) == "" {
		return nil, nil
	}
	var out []float64
	for i, item := range strings.Split(list, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(item), 64)
		if err != nil {
			return nil, usagef("%s: item %d is %q; want a number", flagName, i+1, strings.TrimSpace(item))
		}
		out = append(out, v)
	}
	return out, nil
}

// parseInts reads a comma-separated list of integers ≥ 1; "" gives nil.
func parseInts(flagName, list string) ([]int, error) {
	if strings.TrimSpace(list) == "" {
		return nil, nil
	}
	var out []int
	for i, item := range strings.Split(list, ",") {
		v, err := strconv.Atoi(strings.TrimSpace(item))
		if err != nil || v < 1 {
			return nil, usagef("%s: item %d is %q; want a whole number ≥ 1", flagName, i+1, strings.TrimSpace(item))
		}
		out = append(out, v)
	}
	return out, nil
}

// sweepX returns the swept value of point p.
func sweepX(sw *diag.Sweep, p diag.SweepPoint) float64 {
	if sw.Param == diag.HiddenUnits {
		return float64(p.Units)
	}
	return p.Lambda
}

func statText(st diag.Stat, format string, folds int) string {
	if folds == 1 {
		return num(st.Mean, format)
	}
	return num(st.Mean, format) + " (" + num(st.Min, format) + "–" + num(st.Max, format) + ")"
}

func writeSweepTable(w io.Writer, name string, rows int, sw *diag.Sweep) {
	how := fmt.Sprintf("%d-fold stratified cross-validation", sw.Folds)
	if sw.Holdout > 0 {
		how = fmt.Sprintf("one stratified holdout of %g of the rows", sw.Holdout)
	}
	what := "penalty strength λ (penalty.l2)"
	col := "λ"
	if sw.Param == diag.HiddenUnits {
		what = fmt.Sprintf("units of the first hidden layer (at λ = %g)", sw.Points[0].Lambda)
		col = "units"
	}
	fmt.Fprintf(w, "%s: sweep of the %s; %d rows, %s\n\n", name, what, rows, how)
	out := [][]string{{col, "train cost", "valid cost", "train acc", "valid acc", ""}}
	for i, p := range sw.Points {
		mark := ""
		if i == sw.Best {
			mark = "← lowest validation cost"
		}
		out = append(out, []string{
			strconv.FormatFloat(sweepX(sw, p), 'g', -1, 64),
			statText(p.TrainCost, "%.4f", sw.Folds),
			statText(p.HoldoutCost, "%.4f", sw.Folds),
			statText(p.TrainAccuracy, "%.3f", sw.Folds),
			statText(p.HoldoutAccuracy, "%.3f", sw.Folds),
			mark,
		})
	}
	writeColumns(w, out, 0, true)
	fmt.Fprintln(w)
	if sw.Folds > 1 {
		fmt.Fprintf(w, "Mean over the %d folds, lowest–highest fold in brackets. ", sw.Folds)
	}
	fmt.Fprintln(w, "Costs: cross-entropy without the penalty (nats), on the training and the validation rows of each fit.")
	b := sw.Points[sw.Best]
	fmt.Fprintf(w, "Best: %s = %s (mean validation cost %.4f nats).\n", col, strconv.FormatFloat(sweepX(sw, b), 'g', -1, 64), b.HoldoutCost.Mean)
}

type jsonStat struct {
	Mean jsonNum `json:"mean"`
	SD   jsonNum `json:"sd"`
	Min  jsonNum `json:"min"`
	Max  jsonNum `json:"max"`
}

func toJSONStat(s diag.Stat) jsonStat {
	return jsonStat{jsonNum(s.Mean), jsonNum(s.SD), jsonNum(s.Min), jsonNum(s.Max)}
}

type sweepPointJSON struct {
	L2              float64  `json:"l2"`
	Units           int      `json:"units"`
	TrainCost       jsonStat `json:"train_cost"`
	HoldoutCost     jsonStat `json:"valid_cost"`
	TrainAccuracy   jsonStat `json:"train_accuracy"`
	HoldoutAccuracy jsonStat `json:"valid_accuracy"`
}

type sweepJSON struct {
	Param     string           `json:"param"`
	Folds     int              `json:"folds"`
	Holdout   float64          `json:"holdout"`
	Best      int              `json:"best"`
	BestValue float64          `json:"best_value"`
	Points    []sweepPointJSON `json:"points"`
	Warnings  []string         `json:"warnings"`
}

func writeSweepJSON(w io.Writer, sweeps []*diag.Sweep, warnings [][]string) error {
	out := []sweepJSON{}
	for i, sw := range sweeps {
		sj := sweepJSON{Param: sw.Param.String(), Folds: sw.Folds, Holdout: sw.Holdout, Best: sw.Best, BestValue: sweepX(sw, sw.Points[sw.Best]),
			Warnings: append([]string{}, warnings[i]...)}
		for _, p := range sw.Points {
			sj.Points = append(sj.Points, sweepPointJSON{
				L2: p.Lambda, Units: p.Units,
				TrainCost: toJSONStat(p.TrainCost), HoldoutCost: toJSONStat(p.HoldoutCost),
				TrainAccuracy: toJSONStat(p.TrainAccuracy), HoldoutAccuracy: toJSONStat(p.HoldoutAccuracy),
			})
		}
		out = append(out, sj)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(out)
}

func sweepPlot(name string, sw *diag.Sweep) chart.SweepPlot {
	sp := chart.SweepPlot{Title: name}
	if sw.Param == diag.HiddenUnits {
		sp.XLabel = "units of the first hidden layer (count)"
		sp.Title = fmt.Sprintf("%s, λ = %g", name, sw.Points[0].Lambda)
	}
	for _, p := range sw.Points {
		sp.Lambda = append(sp.Lambda, sweepX(sw, p))
		sp.Train = append(sp.Train, p.TrainCost.Mean)
		sp.Valid = append(sp.Valid, p.HoldoutCost.Mean)
		if sw.Folds > 1 {
			sp.TrainLo, sp.TrainHi = append(sp.TrainLo, p.TrainCost.Min), append(sp.TrainHi, p.TrainCost.Max)
			sp.ValidLo, sp.ValidHi = append(sp.ValidLo, p.HoldoutCost.Min), append(sp.ValidHi, p.HoldoutCost.Max)
		}
	}
	sp.YLabel = "cross-entropy, no penalty (nats)"
	// A log y axis when the values span more than a decade, so that a
	// run-away validation cost (at λ = 0, say) does not flatten the rest.
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range [][]float64{sp.Train, sp.Valid, sp.TrainLo, sp.TrainHi, sp.ValidLo, sp.ValidHi} {
		for _, x := range v {
			if x > 0 {
				lo, hi = math.Min(lo, x), math.Max(hi, x)
			}
		}
	}
	sp.LogY = hi > 10*lo
	return sp
}
