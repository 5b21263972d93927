package main

import (
	"bufio"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/seine-ml/seine/diag"
	"github.com/seine-ml/seine/internal/chart"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

const compareHelp = `Every method starts from the same initial params (the spec's
initialisation with the seed) and minimises the same cost on the same rows,
scaled alike, under the same limits. -seeds K repeats the whole comparison
from seeds S, S+1, … (S = -seed, default the spec's init.seed); the table
gives the median over seeds and, for the final cost, the range.

Evaluations: one pass of cost and gradient over all m training rows counts
1; a mini-batch of b rows counts b/m. Momentum and Adam run on mini-batches
of -batch rows (default the spec's train.batch, else 32) and one iteration
is one epoch; their cost is measured over all rows after each epoch, off
the clock and the count. Seconds exclude that and the holdout scoring.

The target cost of a seed is c*·(1 + F) with c* the lowest cost any method
reached from it (F = -target, default 0.01); the table gives the median
evaluations and seconds to reach it over the seeds that did, and how many.

Several problems: repeat -spec and -data in pairs, or give -problems FILE, a
text file with one "SPEC DATA" pair of paths per line (relative to the
file's folder; blank lines and lines starting with # are skipped). The
tables then follow one another, and performance profiles (Dolan & Moré 2002)
over every problem and seed summarise them: ρ(τ) is the share of problem
instances a method solved within τ times the fewest evaluations (or least
time) of any method. With several problems -plot draws the profile by
evaluations to FILE and by time to FILE with "-time" before the extension;
with one problem it draws cost against evaluations and wall time.

-trace writes every iteration of every run as CSV with the columns method,
seed, iteration, evaluations, seconds, cost, grad_norm, holdout_accuracy
(and problem first, with several problems). -json writes an array with one
object per method (and problem): optimizer, final_cost, final_cost_min,
final_cost_max, evaluations, iterations, seconds, evaluations_to_target,
seconds_to_target, reached, seeds, holdout_accuracy, status; null stands
for a figure that does not exist.

Progress goes to standard error, a line per finished run (a line redrawn
in place on a terminal); -quiet leaves it out. -shard K/N runs only the
runs i (problem × seed × method, see seine help merge) with i mod N = K and
writes them as JSON, to -out FILE or standard output; seine merge puts the
N parts back together.
`

// multiFlag collects a repeatable string flag.
type multiFlag []string

func (m *multiFlag) String() string     { return strings.Join(*m, ",") }
func (m *multiFlag) Set(v string) error { *m = append(*m, v); return nil }

// problemPaths is one spec and data file pair.
type problemPaths struct{ spec, data string }

func runCompare(ctx context.Context, e *env, args []string) error {
	fs := newFlags("compare", e)
	comma := commaFlag(fs)
	var specs, datas multiFlag
	fs.Var(&specs, "spec", "spec `FILE` (YAML); repeat with -data for several problems")
	fs.Var(&datas, "data", "labelled CSV `FILE`; one per -spec, in the same order")
	problems := fs.String("problems", "", "text `FILE` of \"SPEC DATA\" path pairs, one per line")
	label := labelFlag(fs, false)
	optimizers := fs.String("optimizers", "gd,cg,lbfgs,momentum,adam", "comma-separated `LIST` of methods")
	iterations := iterationsFlag(fs)
	evaluations := fs.Float64("evaluations", 0, "evaluation limit of every run; 0 means none")
	seeds := fs.Int("seeds", 1, "number `K` of initialisation seeds")
	seed := fs.Uint64("seed", 0, "first initialisation seed (default the spec's init.seed)")
	holdout := fs.Float64("holdout", 0, "fraction of rows in [0, 1) kept out and scored after every iteration")
	batch := fs.Int("batch", 0, "mini-batch rows of momentum and adam (default the spec's train.batch, else 32)")
	target := fs.Float64("target", diag.DefaultTarget, "target cost: within this fraction of the best cost of each seed")
	standardize := standardizeFlag(fs)
	asJSON := jsonFlag(fs, "the table")
	plot := plotFileFlag(fs, "cost curves (one problem) or performance profiles (several)")
	trace := fs.String("trace", "", "write every iteration of every run to `FILE`.csv")
	quiet := quietFlag(fs)
	so := addShardFlags(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	var pairs []problemPaths
	switch {
	case *problems != "" && (len(specs) > 0 || len(datas) > 0):
		return usagef("give either -problems or -spec and -data, not both")
	case *problems != "":
		var err error
		if pairs, err = readProblems(*problems); err != nil {
			return err
		}
	default:
		if len(specs) == 0 {
			return usagef("-spec is required")
		}
		if len(datas) == 0 {
			return usagef("-data is required")
		}
		if len(specs) != len(datas) {
			return usagef("%d -spec and %d -data flags: give them in pairs", len(specs), len(datas))
		}
		for i := range specs {
			pairs = append(pairs, problemPaths{specs[i], datas[i]})
		}
	}
	opts, err := parseOptimizers(*optimizers)
	if err != nil {
		return err
	}
	switch {
	case *iterations < 0:
		return usagef("-iterations %d: want ≥ 0", *iterations)
	case !(*evaluations >= 0) || math.IsInf(*evaluations, 1):
		return usagef("-evaluations %g: want a number ≥ 0", *evaluations)
	case *seeds < 1:
		return usagef("-seeds %d: want ≥ 1", *seeds)
	case !(*holdout >= 0 && *holdout < 1):
		return usagef("-holdout %g: want a fraction in [0, 1)", *holdout)
	case *batch < 0:
		return usagef("-batch %d: want ≥ 0", *batch)
	case !(*target > 0) || math.IsInf(*target, 1):
		return usagef("-target %g: want a fraction > 0", *target)
	}
	var inputs []string
	for _, p := range pairs {
		inputs = append(inputs, "spec", p.spec, "data", p.data)
	}
	plotFormat, err := plotFlag("-plot", *plot, inputs...)
	if err != nil {
		return err
	}
	if err := so.check(os.Getenv, *plot, *trace, inputs...); err != nil {
		return err
	}
	if *trace != "" {
		if err := refuseOverwrite("-trace", *trace, inputs...); err != nil {
			return err
		}
		if err := checkWritable("-trace", *trace); err != nil {
			return err
		}
	}

	cfg := diag.CompareConfig{
		Optimizers: opts,
		Limits:     optim.Limits{Iterations: *iterations, Evaluations: *evaluations},
		Batch:      *batch,
		Seeds:      *seeds,
		Seed:       *seed,
		Holdout:    *holdout,
		Target:     *target,
		NoScale:    !*standardize,
	}
	comps := make([]*diag.Comparison, len(pairs))
	names := make([]string, len(pairs))
	var pps []partProblem
	for i, p := range pairs {
		s, err := loadSpec(ctx, p.spec)
		if err != nil {
			return err
		}
		set, err := loadData(ctx, p.data, withComma(dataFor(s, *label), comma))
		if err != nil {
			return err
		}
		names[i] = problemName(s, p.data)
		pr := progressFor(e, *quiet, "compare", func(f diag.FitDone) string { return fmt.Sprintf("%s, seed %d", f.Method, f.Seed) })
		if len(pairs) > 1 {
			pr.note("compare: problem %d of %d: %s", i+1, len(pairs), names[i])
			pr.prefix = fmt.Sprintf("problem %d/%d: ", i+1, len(pairs))
		}
		c := cfg
		c.Progress = pr.fit
		if so.on() {
			c.Shard = problemShard(so.shard, i, len(opts)*cfg.Seeds)
		}
		comp, err := diag.Compare(ctx, s, set, c)
		pr.done()
		if err != nil {
			return fmt.Errorf("%s: %w", names[i], err)
		}
		for _, w := range comp.Warnings {
			fmt.Fprintf(e.stderr, "compare: %s: warning: %s\n", names[i], w)
		}
		comps[i] = comp
		if so.on() {
			pp, err := describeProblem(ctx, names[i], s, p.data, set.Rows())
			if err != nil {
				return err
			}
			pps = append(pps, pp)
		}
	}
	if so.on() {
		settings := settingsOf(fs)
		names := make([]string, len(opts))
		for i, o := range opts {
			names[i] = o.String()
		}
		settings["optimizers"] = strings.Join(names, ",")
		pt := &part{Command: "compare", Problems: pps, Settings: settings}
		for _, c := range comps {
			pt.Compare = append(pt.Compare, toComparePart(c))
		}
		return writePart(e, so, pt)
	}
	return reportComparisons(e, names, comps, outputs{json: *asJSON, plot: *plot, format: plotFormat, trace: *trace})
}

// reportComparisons writes the tables or JSON, the profiles, the trace and
// the plots of whole comparisons (run here or merged from parts).
func reportComparisons(e *env, names []string, comps []*diag.Comparison, o outputs) error {
	var byEvals, bySecs *diag.Profile
	if len(comps) > 1 {
		var err error
		if byEvals, bySecs, err = diag.Profiles(comps); err != nil {
			return err
		}
	}
	if o.json {
		if err := writeCompareJSON(e.stdout, names, comps); err != nil {
			return err
		}
	} else {
		for i, c := range comps {
			if i > 0 {
				fmt.Fprintln(e.stdout)
			}
			writeCompareTable(e.stdout, names[i], c)
		}
		if byEvals != nil {
			fmt.Fprintln(e.stdout)
			writeProfileTable(e.stdout, "evaluations to target", byEvals)
			fmt.Fprintln(e.stdout)
			writeProfileTable(e.stdout, "seconds to target", bySecs)
		}
	}
	if o.trace != "" {
		if err := writeAtomic(o.trace, func(w io.Writer) error { return writeTrace(w, names, comps) }); err != nil {
			return fmt.Errorf("-trace %s: %w", o.trace, err)
		}
	}
	if o.plot != "" {
		if byEvals == nil {
			cp := costPlot(names[0], comps[0])
			if err := writeAtomic(o.plot, func(w io.Writer) error { return cp.Write(w, o.format) }); err != nil {
				return fmt.Errorf("-plot %s: %w", o.plot, err)
			}
		} else {
			timePath := suffixed(o.plot, "-time")
			for _, pp := range []struct {
				path, xlabel string
				p            *diag.Profile
			}{
				{o.plot, "within a factor τ of the fewest evaluations to target", byEvals},
				{timePath, "within a factor τ of the least wall time to target", bySecs},
			} {
				title := fmt.Sprintf("performance profile over %d problems × %d seeds", len(comps), len(comps[0].Seeds))
				err := writeAtomic(pp.path, func(w io.Writer) error {
					return chart.ProfilePlot(w, o.format, title, pp.xlabel, pp.p.Solvers, pp.p.Taus, pp.p.Rho)
				})
				if err != nil {
					return fmt.Errorf("-plot %s: %w", pp.path, err)
				}
			}
		}
	}
	return nil
}

// readProblems reads a problems file: one "SPEC DATA" pair per line,
// paths relative to the file's folder.
func readProblems(path string) ([]problemPaths, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, openError("problems", err)
	}
	defer f.Close()
	dir := filepath.Dir(path)
	rel := func(p string) string {
		if filepath.IsAbs(p) {
			return p
		}
		return filepath.Join(dir, p)
	}
	var out []problemPaths
	sc := bufio.NewScanner(f)
	for line := 1; sc.Scan(); line++ {
		t := strings.TrimSpace(sc.Text())
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		fields := strings.Fields(t)
		if len(fields) != 2 {
			return nil, fmt.Errorf("%s:%d: %d fields, want two paths \"SPEC DATA\" separated by spaces", path, line, len(fields))
		}
		out = append(out, problemPaths{rel(fields[0]), rel(fields[1])})
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s: no \"SPEC DATA\" lines", path)
	}
	return out, nil
}

// parseOptimizers turns "gd,cg" into optimizer values.
func parseOptimizers(list string) ([]spec.Optimizer, error) {
	var out []spec.Optimizer
	for i, name := range strings.Split(list, ",") {
		name = strings.TrimSpace(name)
		o, ok := spec.ParseOptimizer(name)
		if !ok {
			return nil, usagef("-optimizers: item %d is %q; want names among gd, cg, lbfgs, momentum, adam", i+1, name)
		}
		for _, p := range out {
			if p == o {
				return nil, usagef("-optimizers: %q is listed twice", name)
			}
		}
		out = append(out, o)
	}
	return out, nil
}

// plotFlag checks a plot file name: its extension, and that it does not
// name an input.
func plotFlag(flagName, path string, inputs ...string) (chart.Format, error) {
	if path == "" {
		return 0, nil
	}
	f, err := chart.FormatOf(path)
	if err != nil {
		return 0, usagef("%s %s: want a file name ending in .png or .svg", flagName, path)
	}
	if err := refuseOverwrite(flagName, path, inputs...); err != nil {
		return 0, err
	}
	if err := checkWritable(flagName, path); err != nil {
		return 0, err
	}
	return f, nil
}

// suffixed puts suffix before the extension of path: a.png → a-time.png.
func suffixed(path, suffix string) string {
	ext := filepath.Ext(path)
	return strings.TrimSuffix(path, ext) + suffix + ext
}

// problemName names a problem by the spec's name (if any) and the data
// file's base name.
func problemName(s *spec.Network, dataPath string) string {
	if s.Name != "" {
		return s.Name + " on " + filepath.Base(dataPath)
	}
	return filepath.Base(dataPath)
}

// num formats v for a table: "–" when it is NaN or infinite.
func num(v float64, format string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "–"
	}
	return fmt.Sprintf(format, v)
}

// countNum formats an evaluation count: whole when it is within 1e-6 of
// an integer (sums of b/m shares drift by rounding), else one decimal.
func countNum(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "–"
	}
	if r := math.Round(v); math.Abs(v-r) < 1e-6 {
		return strconv.FormatFloat(r, 'f', 0, 64)
	}
	return strconv.FormatFloat(v, 'f', 1, 64)
}

func statusText(sc []diag.StatusCount) string {
	parts := make([]string, len(sc))
	for i, s := range sc {
		parts[i] = s.Status.String()
		if len(sc) > 1 || s.Runs > 1 {
			parts[i] += "×" + strconv.Itoa(s.Runs)
		}
	}
	return strings.Join(parts, " ")
}

func writeCompareTable(w io.Writer, name string, c *diag.Comparison) {
	fmt.Fprintf(w, "%s: %d training rows", name, c.TrainRows)
	if c.HoldoutRows > 0 {
		fmt.Fprintf(w, ", %d holdout rows", c.HoldoutRows)
	}
	seedText := make([]string, len(c.Seeds))
	for i, s := range c.Seeds {
		seedText[i] = strconv.FormatUint(s, 10)
	}
	fmt.Fprintf(w, "; seeds %s; target: cost within %g%% of the best of each seed\n\n", strings.Join(seedText, ", "), c.Target*100)
	head := []string{"method", "final cost", "range", "evals", "iters", "seconds", "evals→target", "s→target", "reached", "holdout acc", "status"}
	rows := [][]string{head}
	for _, m := range c.Summary {
		rows = append(rows, []string{
			m.Method,
			num(m.Cost.Median, "%.6g"),
			num(m.Cost.Min, "%.4g") + "–" + num(m.Cost.Max, "%.4g"),
			countNum(m.Evaluations.Median),
			countNum(m.Iterations.Median),
			num(m.Seconds.Median, "%.3g"),
			countNum(m.EvalsToTarget.Median),
			num(m.SecondsToTarget.Median, "%.3g"),
			fmt.Sprintf("%d/%d", m.Reached, len(c.Seeds)),
			num(m.HoldoutAccuracy.Median, "%.3f"),
			statusText(m.Statuses),
		})
	}
	writeColumns(w, rows, 1, true)
	fmt.Fprintf(w, "\nFigures are medians over the seeds (range: lowest–highest final cost); costs in nats, penalty included.\n")
	fmt.Fprintf(w, "Evaluations: a pass over all %d training rows counts 1, a mini-batch of b rows b/%d (momentum and adam: batches of %d rows, one iteration per epoch).\n", c.TrainRows, c.TrainRows, c.Batch)
	fmt.Fprintf(w, "Seconds are wall time without holdout scoring and the full-cost checks of mini-batch methods; to-target figures are over the seeds that reached it.\n")
}

// writeColumns writes rows as space-aligned columns; columns from
// numeric onward are right-aligned, except the last when lastText.
func writeColumns(w io.Writer, rows [][]string, numeric int, lastText bool) {
	width := make([]int, len(rows[0]))
	for _, r := range rows {
		for j, c := range r {
			width[j] = max(width[j], len([]rune(c)))
		}
	}
	for _, r := range rows {
		var b strings.Builder
		for j, c := range r {
			if j > 0 {
				b.WriteString("  ")
			}
			padn := width[j] - len([]rune(c))
			if j >= numeric && (j < len(r)-1 || !lastText) {
				b.WriteString(strings.Repeat(" ", padn) + c)
			} else {
				b.WriteString(c + strings.Repeat(" ", padn))
			}
		}
		fmt.Fprintln(w, strings.TrimRight(b.String(), " "))
	}
}

// profileTaus are the τ at which the table reads the profiles.
var profileTaus = []float64{1, 2, 4, 8, 16}

func writeProfileTable(w io.Writer, by string, p *diag.Profile) {
	fmt.Fprintf(w, "Performance profile by %s (Dolan & Moré 2002): share of problem instances solved within τ × the best\n\n", by)
	head := []string{"method"}
	for _, t := range profileTaus {
		head = append(head, fmt.Sprintf("ρ(%g)", t))
	}
	head = append(head, "solved")
	rows := [][]string{head}
	for s, name := range p.Solvers {
		r := []string{name}
		for _, t := range profileTaus {
			r = append(r, fmt.Sprintf("%.2f", p.At(s, t)))
		}
		r = append(r, fmt.Sprintf("%.2f", p.At(s, math.Inf(1))))
		rows = append(rows, r)
	}
	writeColumns(w, rows, 1, false)
}

// jsonNum is a float that is written as null when it is NaN or infinite.
type jsonNum float64

func (v jsonNum) MarshalJSON() ([]byte, error) {
	f := float64(v)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

type compareRow struct {
	Problem         string  `json:"problem,omitempty"`
	Optimizer       string  `json:"optimizer"`
	FinalCost       jsonNum `json:"final_cost"`
	FinalCostMin    jsonNum `json:"final_cost_min"`
	FinalCostMax    jsonNum `json:"final_cost_max"`
	Evaluations     jsonNum `json:"evaluations"`
	Iterations      jsonNum `json:"iterations"`
	Seconds         jsonNum `json:"seconds"`
	EvalsToTarget   jsonNum `json:"evaluations_to_target"`
	SecondsToTarget jsonNum `json:"seconds_to_target"`
	Reached         int     `json:"reached"`
	Seeds           int     `json:"seeds"`
	HoldoutAccuracy jsonNum `json:"holdout_accuracy"`
	Status          string  `json:"status"`
}

func writeCompareJSON(w io.Writer, names []string, comps []*diag.Comparison) error {
	rows := []compareRow{}
	for i, c := range comps {
		for _, m := range c.Summary {
			r := compareRow{
				Optimizer:       m.Method,
				FinalCost:       jsonNum(m.Cost.Median),
				FinalCostMin:    jsonNum(m.Cost.Min),
				FinalCostMax:    jsonNum(m.Cost.Max),
				Evaluations:     jsonNum(m.Evaluations.Median),
				Iterations:      jsonNum(m.Iterations.Median),
				Seconds:         jsonNum(m.Seconds.Median),
				EvalsToTarget:   jsonNum(m.EvalsToTarget.Median),
				SecondsToTarget: jsonNum(m.SecondsToTarget.Median),
				Reached:         m.Reached,
				Seeds:           len(c.Seeds),
				HoldoutAccuracy: jsonNum(m.HoldoutAccuracy.Median),
				Status:          statusText(m.Statuses),
			}
			if len(comps) > 1 {
				r.Problem = names[i]
			}
			rows = append(rows, r)
		}
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(rows)
}

func writeTrace(w io.Writer, names []string, comps []*diag.Comparison) error {
	cw := csv.NewWriter(w)
	head := []string{"method", "seed", "iteration", "evaluations", "seconds", "cost", "grad_norm", "holdout_accuracy"}
	if len(comps) > 1 {
		head = append([]string{"problem"}, head...)
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	g := func(v float64) string {
		if math.IsNaN(v) {
			return ""
		}
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	for pi, c := range comps {
		for i := range c.Methods {
			for _, r := range c.Runs[i] {
				for _, tp := range r.Trace {
					rec := []string{r.Method, strconv.FormatUint(r.Seed, 10), strconv.Itoa(tp.Iter),
						g(tp.Evaluations), g(tp.Seconds), g(tp.Cost), g(tp.GradNorm), g(tp.HoldoutAccuracy)}
					if len(comps) > 1 {
						rec = append([]string{names[pi]}, rec...)
					}
					if err := cw.Write(rec); err != nil {
						return err
					}
				}
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// costPlot draws every run of c: one thin line per method and seed, the
// seeds of a method sharing its style and legend entry. The cost axis is
// relative to the best cost (cost − c*) when every method ends within a
// factor 2 of c*, where absolute curves would crowd together on a log
// axis.
func costPlot(name string, c *diag.Comparison) chart.CostPlot {
	cp := chart.CostPlot{Title: name}
	relative := true
	for k, best := range c.Best {
		for i := range c.Methods {
			if !(c.Runs[i][k].Cost <= 2*best) {
				relative = false
			}
		}
	}
	cp.Relative = relative
	for i, m := range c.Methods {
		for _, r := range c.Runs[i] {
			ev := chart.Series{Name: m}
			sec := chart.Series{Name: m}
			for _, tp := range r.Trace {
				ev.X, ev.Y = append(ev.X, tp.Evaluations), append(ev.Y, tp.Cost)
				sec.X, sec.Y = append(sec.X, tp.Seconds), append(sec.Y, tp.Cost)
			}
			if len(ev.X) == 0 {
				continue
			}
			cp.ByEvals = append(cp.ByEvals, ev)
			cp.BySeconds = append(cp.BySeconds, sec)
		}
	}
	return cp
}
