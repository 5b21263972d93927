package main

import (
	"bufio"
	"context"
	"encoding/csv"
	"encoding/json"
	"flag"
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

// runCompare checks the flags, runs the comparison of every problem (or,
// with -shard, the shard's part of it) and reports them (or writes the
// part).
func runCompare(ctx context.Context, e *env, args []string) error {
	f := newCompareFlags(e)
	if err := parseFlags(f.fs, args); err != nil {
		return err
	}
	pairs, err := f.problemPaths()
	if err != nil {
		return err
	}
	cfg, err := f.config()
	if err != nil {
		return err
	}
	out, err := f.outputs(pairs)
	if err != nil {
		return err
	}
	names := make([]string, len(pairs))
	comps := make([]*diag.Comparison, len(pairs))
	var pps []partProblem
	for i, p := range pairs {
		var pp partProblem
		if names[i], comps[i], pp, err = compareProblem(ctx, e, f, cfg, p, i, len(pairs)); err != nil {
			return err
		}
		if f.so.on() {
			pps = append(pps, pp)
		}
	}
	if f.so.on() {
		return writeComparePart(e, f, cfg.Optimizers, pps, comps)
	}
	return reportComparisons(e, names, comps, out)
}

// compareFlags are the flags of compare.
type compareFlags struct {
	fs           *flag.FlagSet
	comma        *commaValue
	specs, datas multiFlag
	problems     *string
	label        *string
	optimizers   *string
	iterations   *int
	evaluations  *float64
	seeds        *int
	seed         *uint64
	holdout      *float64
	batch        *int
	target       *float64
	standardize  *bool
	asJSON       *bool
	plot         *string
	trace        *string
	quiet        *bool
	so           *shardOpts
}

// newCompareFlags defines the flags of compare.
func newCompareFlags(e *env) *compareFlags {
	fs := newFlags("compare", e)
	f := &compareFlags{fs: fs}
	f.comma = commaFlag(fs)
	fs.Var(&f.specs, "spec", "spec `FILE` (YAML); repeat with -data for several problems")
	fs.Var(&f.datas, "data", "labelled CSV `FILE`; one per -spec, in the same order")
	f.problems = fs.String("problems", "", "text `FILE` of \"SPEC DATA\" path pairs, one per line")
	f.label = labelFlag(fs, false)
	f.optimizers = fs.String("optimizers", "gd,cg,lbfgs,momentum,adam", "comma-separated `LIST` of methods")
	f.iterations = iterationsFlag(fs)
	f.evaluations = fs.Float64("evaluations", 0, "evaluation limit of every run; 0 means none")
	f.seeds = fs.Int("seeds", 1, "number `K` of initialisation seeds")
	f.seed = fs.Uint64("seed", 0, "first initialisation seed (default the spec's init.seed)")
	f.holdout = fs.Float64("holdout", 0, "fraction of rows in [0, 1) kept out and scored after every iteration")
	f.batch = fs.Int("batch", 0, "mini-batch rows of momentum and adam (default the spec's train.batch, else 32)")
	f.target = fs.Float64("target", diag.DefaultTarget, "target cost: within this fraction of the best cost of each seed")
	f.standardize = standardizeFlag(fs)
	f.asJSON = jsonFlag(fs, "the table")
	f.plot = plotFileFlag(fs, "cost curves (one problem) or performance profiles (several)")
	f.trace = fs.String("trace", "", "write every iteration of every run to `FILE`.csv")
	f.quiet = quietFlag(fs)
	f.so = addShardFlags(fs)
	return f
}

// problemPaths returns the spec and data files of the problems: those of
// -problems, or the -spec and -data pairs.
func (f *compareFlags) problemPaths() ([]problemPaths, error) {
	switch {
	case *f.problems != "" && (len(f.specs) > 0 || len(f.datas) > 0):
		return nil, usagef("give either -problems or -spec and -data, not both")
	case *f.problems != "":
		return readProblems(*f.problems)
	case len(f.specs) == 0:
		return nil, usagef("-spec is required")
	case len(f.datas) == 0:
		return nil, usagef("-data is required")
	case len(f.specs) != len(f.datas):
		return nil, usagef("%d -spec and %d -data flags: give them in pairs", len(f.specs), len(f.datas))
	}
	var pairs []problemPaths
	for i := range f.specs {
		pairs = append(pairs, problemPaths{f.specs[i], f.datas[i]})
	}
	return pairs, nil
}

// config checks the flags that shape the runs and returns them as the
// config of every problem (without its Progress and Shard).
func (f *compareFlags) config() (diag.CompareOptions, error) {
	opts, err := parseOptimizers(*f.optimizers)
	if err != nil {
		return diag.CompareOptions{}, err
	}
	switch {
	case *f.iterations < 0:
		return diag.CompareOptions{}, usagef("-iterations %d: want ≥ 0", *f.iterations)
	case !(*f.evaluations >= 0) || math.IsInf(*f.evaluations, 1):
		return diag.CompareOptions{}, usagef("-evaluations %g: want a number ≥ 0", *f.evaluations)
	case *f.seeds < 1:
		return diag.CompareOptions{}, usagef("-seeds %d: want ≥ 1", *f.seeds)
	case !(*f.holdout >= 0 && *f.holdout < 1):
		return diag.CompareOptions{}, usagef("-holdout %g: want a fraction in [0, 1)", *f.holdout)
	case *f.batch < 0:
		return diag.CompareOptions{}, usagef("-batch %d: want ≥ 0", *f.batch)
	case !(*f.target > 0) || math.IsInf(*f.target, 1):
		return diag.CompareOptions{}, usagef("-target %g: want a fraction > 0", *f.target)
	}
	return diag.CompareOptions{
		Optimizers: opts,
		Limits:     optim.Limits{Iterations: *f.iterations, Evaluations: *f.evaluations},
		Batch:      *f.batch,
		Seeds:      *f.seeds,
		Seed:       *f.seed,
		Holdout:    *f.holdout,
		Target:     *f.target,
		NoScale:    !*f.standardize,
	}, nil
}

// outputs checks -plot, -trace, -shard and -out: that they go together and
// name none of the problems' files.
func (f *compareFlags) outputs(pairs []problemPaths) (outputs, error) {
	var inputs []string
	for _, p := range pairs {
		inputs = append(inputs, "spec", p.spec, "data", p.data)
	}
	plotFormat, err := plotFlag("-plot", *f.plot, inputs...)
	if err != nil {
		return outputs{}, err
	}
	if err := f.so.check(os.Getenv, *f.plot, *f.trace, inputs...); err != nil {
		return outputs{}, err
	}
	if *f.trace != "" {
		if err := refuseOverwrite("-trace", *f.trace, inputs...); err != nil {
			return outputs{}, err
		}
		if err := checkWritable("-trace", *f.trace); err != nil {
			return outputs{}, err
		}
	}
	return outputs{json: *f.asJSON, plot: *f.plot, format: plotFormat, trace: *f.trace}, nil
}

// compareProblem loads problem i of n and runs its comparison (or, with
// -shard, the shard's part of it), reporting progress and warnings on
// standard error. It returns the problem's name, the comparison and, with
// -shard, the problem as the part describes it.
func compareProblem(ctx context.Context, e *env, f *compareFlags, cfg diag.CompareOptions, p problemPaths, i, n int) (string, *diag.Comparison, partProblem, error) {
	s, err := loadSpec(ctx, p.spec)
	if err != nil {
		return "", nil, partProblem{}, err
	}
	set, err := loadData(ctx, p.data, withComma(dataFor(s, *f.label), f.comma))
	if err != nil {
		return "", nil, partProblem{}, err
	}
	name := problemName(s, p.data)
	pr := progressFor(e, *f.quiet, "compare", func(d diag.FitDone) string { return fmt.Sprintf("%s, seed %d", d.Method, d.Seed) })
	if n > 1 {
		pr.note("compare: problem %d of %d: %s", i+1, n, name)
		pr.prefix = fmt.Sprintf("problem %d/%d: ", i+1, n)
	}
	cfg.Progress = pr.fit
	if f.so.on() {
		cfg.Shard = problemShard(f.so.shard, i, len(cfg.Optimizers)*cfg.Seeds)
	}
	comp, err := diag.Compare(ctx, s, set, cfg)
	pr.done()
	if err != nil {
		return "", nil, partProblem{}, fmt.Errorf("%s: %w", name, err)
	}
	for _, w := range comp.Warnings {
		fmt.Fprintf(e.stderr, "compare: %s: warning: %s\n", name, w)
	}
	if !f.so.on() {
		return name, comp, partProblem{}, nil
	}
	pp, err := describeProblem(ctx, name, s, p.data, set.Rows())
	if err != nil {
		return "", nil, partProblem{}, err
	}
	return name, comp, pp, nil
}

// writeComparePart writes the part of a shard: the problems pps, their
// comparisons comps and the settings, with -optimizers as opts.
func writeComparePart(e *env, f *compareFlags, opts []spec.Optimizer, pps []partProblem, comps []*diag.Comparison) error {
	settings := settingsOf(f.fs)
	methods := make([]string, len(opts))
	for i, o := range opts {
		methods[i] = o.String()
	}
	settings["optimizers"] = strings.Join(methods, ",")
	pt := &part{Command: "compare", Problems: pps, Settings: settings}
	for _, c := range comps {
		pt.Compare = append(pt.Compare, toComparePart(c))
	}
	return writePart(e, f.so, pt)
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
						g(tp.Evaluations), g(tp.Elapsed.Seconds()), g(tp.Cost), g(tp.GradNorm), g(tp.HoldoutAccuracy)}
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
				sec.X, sec.Y = append(sec.X, tp.Elapsed.Seconds()), append(sec.Y, tp.Cost)
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
