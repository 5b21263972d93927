package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"maps"
	"math"
	"os"
	"runtime"
	"runtime/debug"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/seine-ml/seine/diag"
	"github.com/seine-ml/seine/internal/ctxio"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

const mergeHelp = `Reads the parts that sweep, compare or curve wrote with -shard K/N and prints
what the whole run would have printed: the same table, -json and -plot (and
-trace for compare), every figure equal bit for bit except wall times.

Every part must come from the same command, spec (compared by a SHA-256 of
its canonical form), data file (a SHA-256 of its bytes), settings, seine
build (version, Go version, platform and matrix backend) and N, and
every shard 0 … N−1 must be given exactly once; a part that breaks this is
refused by name, and nothing is written.

The fits of a run are enumerated in one fixed order, and shard K runs those
whose index i has i mod N = K:
  sweep    value × fold: fit i trains value i / k (in the order of -l2 or
           -units) and validates on fold i mod k (k = -folds, 1 with
           -holdout);
  compare  problem × seed × method: fit i is method i mod M (of the M in
           -optimizers) from seed (i / M) mod S of problem i / (S·M);
  curve    size: fit i trains the (i+1)-th of the -steps sizes.
See docs/scale.md for job runner recipes.
`

// shardHelp is the help text of the -shard flag.
const shardHelp = "run only part `K/N` of the fits (K in 0…N−1) and write it as JSON for seine merge; " +
	"\"env\" or \"env/N\" reads K (and N) from JOB_COMPLETION_INDEX or SLURM_ARRAY_TASK_ID"

// shardOpts are the flags -shard and -out of sweep, compare and curve.
type shardOpts struct {
	spec  string
	out   string
	shard diag.Shard
}

func addShardFlags(fs *flag.FlagSet) *shardOpts {
	o := &shardOpts{}
	fs.StringVar(&o.spec, "shard", "", shardHelp)
	fs.StringVar(&o.out, "out", "", "with -shard: write the part to `FILE` instead of standard output")
	return o
}

// on reports whether the run is a shard.
func (o *shardOpts) on() bool { return o.spec != "" }

// check parses -shard (reading the environment through getenv) and checks
// that the other output flags go with it; inputs are "what", path pairs
// that -out must not name.
func (o *shardOpts) check(getenv func(string) string, plot, trace string, inputs ...string) error {
	if !o.on() {
		if o.out != "" {
			return usagef("-out %s: -out writes a shard's part; give -shard K/N too", o.out)
		}
		return nil
	}
	var err error
	if o.shard, err = parseShard(o.spec, getenv); err != nil {
		return err
	}
	if plot != "" {
		return usagef("-plot: a shard writes only its part; draw the plot with seine merge -plot")
	}
	if trace != "" {
		return usagef("-trace: a shard writes only its part; write the trace with seine merge -trace")
	}
	if o.out != "" {
		if err := refuseOverwrite("-out", o.out, inputs...); err != nil {
			return err
		}
		return checkWritable("-out", o.out)
	}
	return nil
}

// parseShard reads the value of -shard: "K/N", "env" or "env/N".
//
// With "env", K is JOB_COMPLETION_INDEX (a Kubernetes Indexed Job; it sets
// no count, so N must be given as "env/N") or, when that is not set,
// SLURM_ARRAY_TASK_ID − SLURM_ARRAY_TASK_MIN (a Slurm job array, whose
// step SLURM_ARRAY_TASK_STEP must be 1), with N = SLURM_ARRAY_TASK_COUNT
// unless "env/N" gives it (they must then agree).
func parseShard(v string, getenv func(string) string) (diag.Shard, error) {
	kText, nText, ok := strings.Cut(v, "/")
	if !ok && kText != "env" {
		return diag.Shard{}, usagef("-shard %q: want K/N (e.g. 0/4), env or env/N", v)
	}
	n := -1
	if ok {
		var err error
		if n, err = strconv.Atoi(nText); err != nil {
			return diag.Shard{}, usagef("-shard %s: N is %q, want a whole number ≥ 1", v, nText)
		}
		if n < 1 {
			return diag.Shard{}, usagef("-shard %s: N is %d, want ≥ 1", v, n)
		}
	}
	var k int
	var err error
	if kText == "env" {
		if k, n, err = shardFromEnv(v, n, getenv); err != nil {
			return diag.Shard{}, err
		}
	} else if k, err = strconv.Atoi(kText); err != nil {
		return diag.Shard{}, usagef("-shard %s: K is %q, want a whole number in 0…N−1", v, kText)
	}
	if k < 0 || k >= n {
		return diag.Shard{}, usagef("-shard %s: K is %d, want 0 ≤ K < N = %d", v, k, n)
	}
	return diag.Shard{K: k, N: n}, nil
}

// shardFromEnv reads K and N as parseShard documents; n is N from the flag,
// or −1.
func shardFromEnv(v string, n int, getenv func(string) string) (int, int, error) {
	num := func(name string) (int, error) {
		x, err := strconv.Atoi(strings.TrimSpace(getenv(name)))
		if err != nil {
			return 0, usagef("-shard %s: %s is %q, want a whole number", v, name, getenv(name))
		}
		return x, nil
	}
	if getenv("JOB_COMPLETION_INDEX") != "" {
		k, err := num("JOB_COMPLETION_INDEX")
		if err != nil {
			return 0, 0, err
		}
		if n < 0 {
			return 0, 0, usagef("-shard %s: JOB_COMPLETION_INDEX is set but no count is; give -shard env/N with N the Job's completions", v)
		}
		return k, n, nil
	}
	if getenv("SLURM_ARRAY_TASK_ID") == "" {
		return 0, 0, usagef("-shard %s: neither JOB_COMPLETION_INDEX nor SLURM_ARRAY_TASK_ID is set; give -shard K/N", v)
	}
	id, err := num("SLURM_ARRAY_TASK_ID")
	if err != nil {
		return 0, 0, err
	}
	lo := 0
	if getenv("SLURM_ARRAY_TASK_MIN") != "" {
		if lo, err = num("SLURM_ARRAY_TASK_MIN"); err != nil {
			return 0, 0, err
		}
	}
	if st := getenv("SLURM_ARRAY_TASK_STEP"); st != "" && strings.TrimSpace(st) != "1" {
		return 0, 0, usagef("-shard %s: SLURM_ARRAY_TASK_STEP is %s; the array must be a range with step 1 (e.g. --array=0-7)", v, st)
	}
	if getenv("SLURM_ARRAY_TASK_COUNT") != "" {
		c, err := num("SLURM_ARRAY_TASK_COUNT")
		if err != nil {
			return 0, 0, err
		}
		if n >= 0 && c != n {
			return 0, 0, usagef("-shard %s: SLURM_ARRAY_TASK_COUNT is %d, not %d", v, c, n)
		}
		n = c
	}
	if n < 0 {
		return 0, 0, usagef("-shard %s: SLURM_ARRAY_TASK_COUNT is not set; give -shard env/N", v)
	}
	return id - lo, n, nil
}

// partFormat names the part files; partVersion is their format version.
const (
	partFormat  = "seine-part"
	partVersion = 1
)

// part is what one shard writes: what run it is part of, and its fits.
type part struct {
	Format  string `json:"format"`
	Version int    `json:"version"`
	Command string `json:"command"` // sweep, compare or curve
	// Build names the seine build that computed the figures (see
	// buildText): builds of other code, Go versions, platforms or matrix
	// backends may round differently, so merge requires one build.
	Build string `json:"build"`
	K     int    `json:"k"`
	N     int    `json:"n"`
	// Problems are the spec and data files of the run (one, except for a
	// comparison of several problems), in the order given.
	Problems []partProblem `json:"problems"`
	// Settings are the command's flags that shape the figures, as text.
	Settings map[string]string `json:"settings"`
	Sweep    *sweepPart        `json:"sweep,omitempty"`
	Curve    *curvePart        `json:"curve,omitempty"`
	Compare  []comparePart     `json:"compare,omitempty"` // one per problem
}

// shard is the shard the part holds.
func (p *part) shard() diag.Shard { return diag.Shard{K: p.K, N: p.N} }

type partProblem struct {
	Name       string `json:"name"`        // as in the tables: spec name on data file
	SpecSHA256 string `json:"spec_sha256"` // of the spec's canonical YAML (spec.WriteYAML)
	DataSHA256 string `json:"data_sha256"` // of the data file's bytes
	Rows       int    `json:"rows"`        // data rows read
}

// secondsDuration reads a part's seconds back into the duration they were
// written from: seconds below 2^51 ns (26 days) come back to the
// nanosecond; what is not a duration reads as 0.
func secondsDuration(sec float64) time.Duration {
	ns := math.Round(sec * float64(time.Second))
	if !(ns >= 0 && ns < math.MaxInt64) {
		return 0
	}
	return time.Duration(ns)
}

// exact is a float64 written so that it reads back bit for bit: finite
// values in the shortest form that round-trips, NaN and ±Inf as the
// strings "NaN", "+Inf" and "-Inf".
type exact float64

func (v exact) MarshalJSON() ([]byte, error) {
	f := float64(v)
	switch {
	case math.IsNaN(f):
		return []byte(`"NaN"`), nil
	case math.IsInf(f, 1):
		return []byte(`"+Inf"`), nil
	case math.IsInf(f, -1):
		return []byte(`"-Inf"`), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

func (v *exact) UnmarshalJSON(b []byte) error {
	switch string(b) {
	case `"NaN"`:
		*v = exact(math.NaN())
		return nil
	case `"+Inf"`:
		*v = exact(math.Inf(1))
		return nil
	case `"-Inf"`:
		*v = exact(math.Inf(-1))
		return nil
	}
	f, err := strconv.ParseFloat(string(b), 64)
	if err != nil {
		return fmt.Errorf("%s is not a number", b)
	}
	*v = exact(f)
	return nil
}

type sweepPart struct {
	Param   string         `json:"param"`
	Folds   int            `json:"folds"`
	Holdout exact          `json:"holdout"`
	Size    int            `json:"size"`
	Fits    []sweepFitPart `json:"fits"`
}

type sweepFitPart struct {
	Index           int      `json:"index"`
	Value           int      `json:"value"`
	Fold            int      `json:"fold"`
	L2              exact    `json:"l2"`
	Units           int      `json:"units"`
	TrainCost       exact    `json:"train_cost"`
	HoldoutCost     exact    `json:"valid_cost"`
	TrainAccuracy   exact    `json:"train_accuracy"`
	HoldoutAccuracy exact    `json:"valid_accuracy"`
	Warnings        []string `json:"warnings"`
}

type curvePart struct {
	HoldoutRows int              `json:"holdout_rows"`
	Baseline    exact            `json:"baseline"`
	Steps       int              `json:"steps"`
	Points      []curvePointPart `json:"points"`
}

type curvePointPart struct {
	Step            int      `json:"step"`
	Rows            int      `json:"rows"`
	TrainCost       exact    `json:"train_cost"`
	HoldoutCost     exact    `json:"holdout_cost"`
	TrainAccuracy   exact    `json:"train_accuracy"`
	HoldoutAccuracy exact    `json:"holdout_accuracy"`
	Warnings        []string `json:"warnings"`
}

type comparePart struct {
	Methods     []string  `json:"methods"`
	Seeds       []uint64  `json:"seeds"`
	Target      exact     `json:"target"`
	TrainRows   int       `json:"train_rows"`
	HoldoutRows int       `json:"holdout_rows"`
	Batch       int       `json:"batch"`
	Warnings    []string  `json:"warnings"`
	Runs        []runPart `json:"runs"` // by method, then seed
}

// traceColumns are the columns of runPart.Trace.
var traceColumns = []string{"iteration", "evaluations", "seconds", "cost", "grad_norm", "holdout_cost", "holdout_accuracy"}

type runPart struct {
	Method          string `json:"method"`
	Seed            uint64 `json:"seed"`
	Cost            exact  `json:"cost"`
	Evaluations     exact  `json:"evaluations"`
	Iterations      int    `json:"iterations"`
	Seconds         exact  `json:"seconds"`
	Status          string `json:"status"`
	HoldoutCost     exact  `json:"holdout_cost"`
	HoldoutAccuracy exact  `json:"holdout_accuracy"`
	// Trace has one row per iteration, in the order of traceColumns.
	Trace [][]exact `json:"trace"`
}

func toSweepPart(sw *diag.Sweep) *sweepPart {
	sp := &sweepPart{Param: sw.Param.String(), Folds: sw.Folds, Holdout: exact(sw.Holdout), Size: sw.Size, Fits: []sweepFitPart{}}
	for _, f := range sw.Fits {
		sp.Fits = append(sp.Fits, sweepFitPart{
			Index: f.Index, Value: f.Value, Fold: f.Fold, L2: exact(f.Lambda), Units: f.Units,
			TrainCost: exact(f.TrainCost), HoldoutCost: exact(f.HoldoutCost),
			TrainAccuracy: exact(f.TrainAccuracy), HoldoutAccuracy: exact(f.HoldoutAccuracy), Warnings: f.Warnings,
		})
	}
	return sp
}

func (sp *sweepPart) sweep(sh diag.Shard) (*diag.Sweep, error) {
	sw := &diag.Sweep{Folds: sp.Folds, Holdout: float64(sp.Holdout), Size: sp.Size, Shard: sh}
	switch sp.Param {
	case "l2":
		sw.Param = diag.PenaltyL2
	case "units":
		sw.Param = diag.HiddenUnits
	default:
		return nil, fmt.Errorf("sweep param %q, want l2 or units", sp.Param)
	}
	for _, f := range sp.Fits {
		sw.Fits = append(sw.Fits, diag.SweepFit{
			Index: f.Index, Value: f.Value, Fold: f.Fold, Lambda: float64(f.L2), Units: f.Units,
			TrainCost: float64(f.TrainCost), HoldoutCost: float64(f.HoldoutCost),
			TrainAccuracy: float64(f.TrainAccuracy), HoldoutAccuracy: float64(f.HoldoutAccuracy), Warnings: f.Warnings,
		})
	}
	return sw, nil
}

func toCurvePart(c *diag.Curve) *curvePart {
	cp := &curvePart{HoldoutRows: c.HoldoutRows, Baseline: exact(c.Baseline), Steps: c.Steps, Points: []curvePointPart{}}
	for _, p := range c.Points {
		cp.Points = append(cp.Points, curvePointPart{p.Step, p.Rows, exact(p.TrainCost), exact(p.HoldoutCost),
			exact(p.TrainAccuracy), exact(p.HoldoutAccuracy), p.Warnings})
	}
	return cp
}

func (cp *curvePart) curve(sh diag.Shard) *diag.Curve {
	c := &diag.Curve{HoldoutRows: cp.HoldoutRows, Baseline: float64(cp.Baseline), Steps: cp.Steps, Shard: sh}
	for _, p := range cp.Points {
		c.Points = append(c.Points, diag.CurvePoint{Step: p.Step, Rows: p.Rows, TrainCost: float64(p.TrainCost),
			HoldoutCost: float64(p.HoldoutCost), TrainAccuracy: float64(p.TrainAccuracy),
			HoldoutAccuracy: float64(p.HoldoutAccuracy), Warnings: p.Warnings})
	}
	return c
}

func toComparePart(c *diag.Comparison) comparePart {
	cp := comparePart{Methods: c.Methods, Seeds: c.Seeds, Target: exact(c.Target), TrainRows: c.TrainRows,
		HoldoutRows: c.HoldoutRows, Batch: c.Batch, Warnings: c.Warnings, Runs: []runPart{}}
	for i := range c.Runs {
		for _, r := range c.Runs[i] {
			rp := runPart{Method: r.Method, Seed: r.Seed, Cost: exact(r.Cost), Evaluations: exact(r.Evaluations),
				Iterations: r.Iterations, Seconds: exact(r.Elapsed.Seconds()), Status: r.Status.String(),
				HoldoutCost: exact(r.HoldoutCost), HoldoutAccuracy: exact(r.HoldoutAccuracy), Trace: [][]exact{}}
			for _, tp := range r.Trace {
				rp.Trace = append(rp.Trace, []exact{exact(tp.Iter), exact(tp.Evaluations), exact(tp.Elapsed.Seconds()),
					exact(tp.Cost), exact(tp.GradNorm), exact(tp.HoldoutCost), exact(tp.HoldoutAccuracy)})
			}
			cp.Runs = append(cp.Runs, rp)
		}
	}
	return cp
}

// parseStatus reads a run's final status as optim.Status.String writes it;
// Running (which optim.ParseStatus also reads from "" and "Checkpoint") is
// no finished run's status and is refused.
func parseStatus(name string) (optim.Status, bool) {
	s, ok := optim.ParseStatus(name)
	return s, ok && s != optim.Running
}

func (cp *comparePart) comparison(sh diag.Shard) (*diag.Comparison, error) {
	c := &diag.Comparison{Methods: cp.Methods, Seeds: cp.Seeds, Target: float64(cp.Target), TrainRows: cp.TrainRows,
		HoldoutRows: cp.HoldoutRows, Batch: cp.Batch, Warnings: cp.Warnings, Runs: make([][]diag.Run, len(cp.Methods)), Shard: sh}
	for j, rp := range cp.Runs {
		i := slices.Index(cp.Methods, rp.Method)
		if i < 0 {
			return nil, fmt.Errorf("run %d: method %q is not among %v", j+1, rp.Method, cp.Methods)
		}
		st, ok := parseStatus(rp.Status)
		if !ok {
			return nil, fmt.Errorf("run %d: status %q is not known", j+1, rp.Status)
		}
		r := diag.Run{Method: rp.Method, Seed: rp.Seed, Cost: float64(rp.Cost), Evaluations: float64(rp.Evaluations),
			Iterations: rp.Iterations, Elapsed: secondsDuration(float64(rp.Seconds)), Status: st,
			HoldoutCost: float64(rp.HoldoutCost), HoldoutAccuracy: float64(rp.HoldoutAccuracy)}
		for t, row := range rp.Trace {
			if len(row) != len(traceColumns) {
				return nil, fmt.Errorf("run %d: trace row %d has %d columns, want %d (%s)", j+1, t+1, len(row), len(traceColumns), strings.Join(traceColumns, ", "))
			}
			r.Trace = append(r.Trace, diag.TracePoint{Iter: int(row[0]), Evaluations: float64(row[1]), Elapsed: secondsDuration(float64(row[2])),
				Cost: float64(row[3]), GradNorm: float64(row[4]), HoldoutCost: float64(row[5]), HoldoutAccuracy: float64(row[6])})
		}
		c.Runs[i] = append(c.Runs[i], r)
	}
	return c, nil
}

// problemShard is the shard of problem p that the global shard sh of a
// comparison runs: the runs of problem p have the global indices
// p·S·M + j for j = 0 … S·M−1, so j mod N = (K − p·S·M) mod N.
func problemShard(sh diag.Shard, p, perProblem int) diag.Shard {
	return diag.Shard{K: ((sh.K-p*perProblem)%sh.N + sh.N) % sh.N, N: sh.N}
}

// describeProblem hashes the spec's canonical form and the data file's
// bytes, so that merge can tell parts of different runs apart.
func describeProblem(ctx context.Context, name string, s *spec.Network, dataPath string, rows int) (partProblem, error) {
	var buf bytes.Buffer
	if err := s.WriteYAML(&buf); err != nil {
		return partProblem{}, err
	}
	sh := sha256.Sum256(buf.Bytes())
	f, err := os.Open(dataPath)
	if err != nil {
		return partProblem{}, openError("data", err)
	}
	defer f.Close()
	r := ctxio.NewReader(ctx, f)
	defer r.Close()
	h := sha256.New()
	if _, err := io.Copy(h, r); err != nil {
		return partProblem{}, fmt.Errorf("%s: %w", dataPath, err)
	}
	return partProblem{Name: name, SpecSHA256: hex.EncodeToString(sh[:]), DataSHA256: hex.EncodeToString(h.Sum(nil)), Rows: rows}, nil
}

// settingsOf returns the flags of fs that shape the figures, as text: all
// but the inputs and the outputs. Lists are given canonical text by the
// caller.
func settingsOf(fs *flag.FlagSet) map[string]string {
	skip := map[string]bool{"spec": true, "data": true, "problems": true, "json": true, "plot": true, "trace": true,
		"out": true, "shard": true, "quiet": true}
	m := map[string]string{}
	fs.VisitAll(func(f *flag.Flag) {
		if !skip[f.Name] {
			m[f.Name] = f.Value.String()
		}
	})
	return m
}

// floatList and intList are the canonical text of a parsed list.
func floatList(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', -1, 64)
	}
	return strings.Join(s, ",")
}

func intList(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, ",")
}

// writePart writes p as one line of JSON to -out, or to standard output.
func writePart(e *env, o *shardOpts, p *part) error {
	p.Format, p.Version, p.K, p.N, p.Build = partFormat, partVersion, o.shard.K, o.shard.N, buildText()
	write := func(w io.Writer) error {
		enc := json.NewEncoder(w)
		enc.SetEscapeHTML(false)
		return enc.Encode(p)
	}
	if o.out == "" {
		return write(e.stdout)
	}
	if err := writeAtomic(o.out, write); err != nil {
		return fmt.Errorf("-out %s: %w", o.out, err)
	}
	return nil
}

// buildText names this build: module version and VCS revision (when the
// build information has them), library version, Go version, platform and
// matrix backend.
func buildText() string {
	mod := "(unknown)"
	if bi, ok := debug.ReadBuildInfo(); ok {
		mod = bi.Main.Version
		for _, st := range bi.Settings {
			switch {
			case st.Key == "vcs.revision":
				mod += " " + st.Value
			case st.Key == "vcs.modified" && st.Value == "true":
				mod += " modified"
			}
		}
	}
	return fmt.Sprintf("seine %s; library %s; %s %s/%s; %s", mod, nn.Version, runtime.Version(), runtime.GOOS, runtime.GOARCH, nn.Backend())
}

// partError is a part refused by merge, named by its file.
func partError(path string, format string, a ...any) error {
	return fmt.Errorf("%s: %s", path, fmt.Sprintf(format, a...))
}

// readPart reads and checks the form of one part file.
func readPart(ctx context.Context, path string) (*part, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, openError("part", err)
	}
	defer f.Close()
	r := ctxio.NewReader(ctx, f)
	defer r.Close()
	dec := json.NewDecoder(r)
	dec.DisallowUnknownFields()
	var p part
	if err := dec.Decode(&p); err != nil {
		if ctx.Err() != nil {
			return nil, context.Cause(ctx)
		}
		return nil, partError(path, "not a part written by -shard: %v", err)
	}
	switch {
	case p.Format != partFormat:
		return nil, partError(path, "format %q, want %q (a part written by -shard)", p.Format, partFormat)
	case p.Version != partVersion:
		return nil, partError(path, "part format version %d, this seine reads %d", p.Version, partVersion)
	case p.N < 1 || p.K < 0 || p.K >= p.N:
		return nil, partError(path, "shard %d/%d, want 0 ≤ K < N", p.K, p.N)
	case len(p.Problems) == 0:
		return nil, partError(path, "names no spec and data")
	}
	ok := false
	switch p.Command {
	case "sweep":
		ok = p.Sweep != nil && p.Curve == nil && p.Compare == nil && len(p.Problems) == 1
	case "curve":
		ok = p.Curve != nil && p.Sweep == nil && p.Compare == nil && len(p.Problems) == 1
	case "compare":
		ok = p.Sweep == nil && p.Curve == nil && len(p.Compare) == len(p.Problems)
	default:
		return nil, partError(path, "command %q, want sweep, compare or curve", p.Command)
	}
	if !ok {
		return nil, partError(path, "a %s part without its %s results", p.Command, p.Command)
	}
	return &p, nil
}

func runMerge(ctx context.Context, e *env, args []string) error {
	fs := newFlags("merge", e)
	asJSON := fs.Bool("json", false, "write the JSON the whole run writes with -json")
	plot := plotFileFlag(fs, "the plot the whole run draws with -plot")
	trace := fs.String("trace", "", "compare parts: write every iteration of every run to `FILE`.csv")
	if err := parseFlagsArgs(fs, args); err != nil {
		return err
	}
	paths := fs.Args()
	if len(paths) == 0 {
		return usagef("give the part files to merge")
	}
	var inputs []string
	for _, p := range paths {
		if strings.HasPrefix(p, "-") {
			return usagef("flag %s after the part files; give flags first", p)
		}
		inputs = append(inputs, "part", p)
	}
	format, err := plotFlag("-plot", *plot, inputs...)
	if err != nil {
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
	parts := make([]*part, len(paths))
	for i, path := range paths {
		if parts[i], err = readPart(ctx, path); err != nil {
			return err
		}
	}
	if err := checkParts(paths, parts); err != nil {
		return err
	}
	p0 := parts[0]
	if *trace != "" && p0.Command != "compare" {
		return usagef("-trace: the parts are of %s; only compare writes a trace", p0.Command)
	}
	o := outputs{json: *asJSON, plot: *plot, format: format, trace: *trace}
	name := p0.Problems[0].Name
	switch p0.Command {
	case "sweep":
		sws := make([]*diag.Sweep, len(parts))
		for i, p := range parts {
			if sws[i], err = p.Sweep.sweep(p.shard()); err != nil {
				return partError(paths[i], "%v", err)
			}
		}
		sw, err := diag.MergeSweeps(sws)
		if err != nil {
			return mergeError(paths, err)
		}
		return reportSweeps(e, name, p0.Problems[0].Rows, []*diag.Sweep{sw}, o)
	case "curve":
		cs := make([]*diag.Curve, len(parts))
		for i, p := range parts {
			cs[i] = p.Curve.curve(p.shard())
		}
		c, err := diag.MergeCurves(cs)
		if err != nil {
			return mergeError(paths, err)
		}
		return reportCurve(e, name, c, p0.Settings["spec-penalty"] == "true", o)
	}
	names := make([]string, len(p0.Problems))
	comps := make([]*diag.Comparison, len(p0.Problems))
	for pi := range p0.Problems {
		names[pi] = p0.Problems[pi].Name
		cs := make([]*diag.Comparison, len(parts))
		for i, p := range parts {
			cp := p.Compare[pi]
			sh := problemShard(p.shard(), pi, len(cp.Methods)*len(cp.Seeds))
			if cs[i], err = cp.comparison(sh); err != nil {
				return partError(paths[i], "problem %d: %v", pi+1, err)
			}
		}
		if comps[pi], err = diag.MergeComparisons(cs); err != nil {
			return fmt.Errorf("problem %d (%s): %w", pi+1, names[pi], mergeError(paths, err))
		}
	}
	return reportComparisons(e, names, comps, o)
}

// mergeError calls the parts that a diag merge error blames or mentions
// (a diag.PartError) by their files, paths[i] for part i; other errors are
// returned as they are.
func mergeError(paths []string, err error) error {
	var pe *diag.PartError
	if !errors.As(err, &pe) {
		return err
	}
	return &wrapped{msg: pe.Named(func(i int) string { return paths[i] }), err: err}
}

// checkParts refuses parts of different runs, and a shard missing or given
// twice, naming the part.
func checkParts(paths []string, parts []*part) error {
	p0 := parts[0]
	byK := make([]int, p0.N)
	for i, p := range parts {
		switch {
		case p.Command != p0.Command:
			return partError(paths[i], "a part of %s, %s a part of %s", p.Command, paths[0], p0.Command)
		case p.Build != p0.Build:
			return partError(paths[i], "computed by another build (%s) than %s (%s); run every shard with one seine build", p.Build, paths[0], p0.Build)
		case p.N != p0.N:
			return partError(paths[i], "shard %d/%d, %s is one of %d shards", p.K, p.N, paths[0], p0.N)
		case len(p.Problems) != len(p0.Problems):
			return partError(paths[i], "%d problems, %s %d", len(p.Problems), paths[0], len(p0.Problems))
		}
		for j, pr := range p.Problems {
			q := p0.Problems[j]
			what := ""
			if len(p.Problems) > 1 {
				what = fmt.Sprintf(" of problem %d", j+1)
			}
			if pr.SpecSHA256 != q.SpecSHA256 {
				return partError(paths[i], "from another spec%s than %s (spec SHA-256 %.12s…, not %.12s…)", what, paths[0], pr.SpecSHA256, q.SpecSHA256)
			}
			if pr.DataSHA256 != q.DataSHA256 {
				return partError(paths[i], "from another data file%s than %s (data SHA-256 %.12s…, not %.12s…)", what, paths[0], pr.DataSHA256, q.DataSHA256)
			}
		}
		if !maps.Equal(p.Settings, p0.Settings) {
			var diff []string
			for _, k := range slices.Sorted(maps.Keys(p.Settings)) {
				if v, ok := p0.Settings[k]; !ok || v != p.Settings[k] {
					diff = append(diff, fmt.Sprintf("-%s %q (%s: %q)", k, p.Settings[k], paths[0], v))
				}
			}
			for _, k := range slices.Sorted(maps.Keys(p0.Settings)) {
				if _, ok := p.Settings[k]; !ok {
					diff = append(diff, fmt.Sprintf("no -%s (%s: %q)", k, paths[0], p0.Settings[k]))
				}
			}
			return partError(paths[i], "other settings than %s: %s", paths[0], strings.Join(diff, ", "))
		}
		if j := byK[p.K]; j > 0 {
			return partError(paths[i], "shard %d/%d again (also %s)", p.K, p.N, paths[j-1])
		}
		byK[p.K] = i + 1
	}
	var missing []string
	for k, j := range byK {
		if j == 0 {
			missing = append(missing, fmt.Sprintf("%d/%d", k, p0.N))
		}
	}
	if len(missing) > 0 {
		return fmt.Errorf("shard %s missing: %d parts given, %d needed", strings.Join(missing, ", "), len(parts), p0.N)
	}
	return nil
}
