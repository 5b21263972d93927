package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

// defaultIterations is optim's iteration limit when neither the spec nor
// -iterations sets one (optim.Limits: "0 means 10,000").
const defaultIterations = 10_000

const trainHelp = `Flags that are set override the spec's train: section; flags left out keep
the spec's values. The holdout rows are dealt by class (stratified) with
-seed, which defaults to the spec's init seed and also seeds the initial
params and the mini-batch shuffles.

Progress goes to standard error: a bar redrawn in place on a terminal,
otherwise a line after the first iteration and then at most one per tenth of
the iterations and per 2 seconds; -quiet leaves it out. The summary goes to
standard output.

The model file is replaced only when the run succeeds, by writing a new file
beside it and renaming it over the old one: a failed run never leaves a
half-written or lost model. A run whose cost or gradient becomes NaN or
infinite (diverged) exits with status 1 and writes nothing.

Interrupt (Ctrl-C) or SIGTERM stops the run within one evaluation; the model
of the best iteration so far is saved to -out, a line on standard error says
which, and the exit status is 130 (SIGINT) or 143 (SIGTERM) because the run
did not finish. Interrupted before the first iteration ends, nothing is
written.

-calibrate fits one temperature T on the holdout rows (temperature scaling,
Guo et al. 2017) so that the probabilities match observed frequencies, and
prints the holdout ECE before and after. -threshold-rule chooses operating
thresholds for sigmoid outputs on the holdout rows: max-f1, recall:R (the
highest precision among thresholds with recall ≥ R) or precision:P (the
highest recall with precision ≥ P); one for a binary model, one per class
for a multi-label model. Both are stored in the model and used by predict,
evaluate and the Go API; the summary prints the choice and the holdout
figures there. Softmax models always take the most probable class.

-checkpoint FILE saves the current params as a model file every -every
iterations, replaced atomically like -out. -resume FILE starts from the
params of a model or checkpoint file whose net matches the spec; resume with
the same data, -holdout and -seed so that the scaler is the same.
`

type trainFlags struct {
	spec, data, out, label string
	optimizer              string
	iterations, batch      int
	rate, holdout          float64
	seed                   uint64
	standardize            bool
	keepBest, quiet        bool
	patience               int
	checkpoint, resume     string
	every                  int
	calibrate              bool
	thresholdRule          string
	rule                   *train.ThresholdRule // parsed from thresholdRule
	set                    map[string]bool      // flags given on the command line
}

func runTrain(ctx context.Context, e *env, args []string) error {
	var f trainFlags
	fs := newFlags("train", e)
	comma := commaFlag(fs)
	specP, dataP := specFlag(fs), dataFlag(fs, true)
	fs.StringVar(&f.out, "out", "", "model `FILE` to write (conventionally NAME.seine.json)")
	labelP := labelFlag(fs, false)
	fs.StringVar(&f.optimizer, "optimizer", "", "method: gd, cg, lbfgs, momentum or adam (default the spec's, else lbfgs)")
	iterationsP := iterationsFlag(fs)
	fs.Float64Var(&f.rate, "rate", 0, "learning rate for gd, momentum and adam (default the spec's, else the method's)")
	fs.IntVar(&f.batch, "batch", 0, "mini-batch `rows` for momentum and adam (default the spec's, else 32, as compare uses)")
	fs.Float64Var(&f.holdout, "holdout", 0, "`FRACTION` of the rows, in (0, 1), kept out of training to measure the fit; 0 = none")
	fs.Uint64Var(&f.seed, "seed", 0, "seed of the holdout split, initial params and shuffles (default the spec's init seed)")
	standardizeP := standardizeFlag(fs)
	fs.BoolVar(&f.keepBest, "keep-best", false, "save the params of the iteration with the lowest holdout cost (needs -holdout)")
	fs.IntVar(&f.patience, "patience", 0, "stop after `N` iterations without a lower holdout cost; 0 = never (needs -holdout)")
	quietP := quietFlag(fs)
	fs.StringVar(&f.checkpoint, "checkpoint", "", "also save the current params to this model `FILE` during the run")
	fs.IntVar(&f.every, "every", 0, "checkpoint every `N` iterations (default a tenth of the iteration limit)")
	fs.StringVar(&f.resume, "resume", "", "start from the params of this model or checkpoint `FILE`")
	fs.BoolVar(&f.calibrate, "calibrate", false, "fit a temperature on the holdout rows so that probabilities match frequencies (needs -holdout)")
	fs.StringVar(&f.thresholdRule, "threshold-rule", "", "choose operating thresholds on the holdout rows (sigmoid outputs; needs -holdout): max-f1, recall:R (highest precision with recall ≥ R) or precision:P (highest recall with precision ≥ P)")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	f.spec, f.data, f.label, f.iterations, f.standardize, f.quiet = *specP, *dataP, *labelP, *iterationsP, *standardizeP, *quietP
	f.set = map[string]bool{}
	fs.Visit(func(fl *flag.Flag) { f.set[fl.Name] = true })
	if err := f.check(); err != nil {
		return err
	}

	s, err := loadSpec(ctx, f.spec)
	if err != nil {
		return err
	}
	s = s.Clone()
	f.override(s, e.stderr)
	if err := refuseOverwrite("-out", f.out, "spec", f.spec, "data", f.data, "-resume", f.resume); err != nil {
		return err
	}
	if err := refuseOverwrite("-checkpoint", f.checkpoint, "spec", f.spec, "data", f.data, "-out", f.out); err != nil {
		return err
	}
	opt := withComma(dataFor(s, f.label), comma)
	if guess := rowsGuess(f.data, s.Inputs+1); guess > 0 { // the inputs and the label
		limitHeap(s, nil, guess, int(f.holdout*float64(guess)))
		opt.RowsHint = guess + guess/32 // the guess is within a few percent
	}
	set, err := loadData(ctx, f.data, opt)
	if err != nil {
		return err
	}
	if err := checkWritable("-out", f.out); err != nil {
		return err
	}
	if f.checkpoint != "" {
		if err := checkWritable("-checkpoint", f.checkpoint); err != nil {
			return err
		}
	}

	limitHeap(s, set, set.Rows(), int(f.holdout*float64(set.Rows())))
	trainSet, hold := set, (*data.Set)(nil)
	if f.holdout > 0 {
		if trainSet, hold, err = data.Split(set, f.holdout, s.Init.Seed); err != nil {
			return fmt.Errorf("%s: -holdout %g of %d rows: %w", f.data, f.holdout, set.Rows(), err)
		}
	}
	cfg := train.Options{
		Holdout:  hold,
		KeepBest: f.keepBest,
		Patience: f.patience,
		NoScale:  !f.standardize,
		DropRows: true, // the rows as read are not used after encoding

		Calibrate:  f.calibrate,
		Thresholds: f.rule,
	}
	if f.resume != "" {
		if cfg.Start, err = resumeParams(ctx, f.resume, s); err != nil {
			return err
		}
	}
	limit := s.Train.Iterations
	if limit == 0 {
		limit = defaultIterations
	}
	var pr *progress
	if f.quiet {
		pr = newProgress(nil, false, limit)
	} else {
		pr = newProgress(e.stderr, e.terminal, limit)
	}
	cfg.Progress = pr.step
	if f.checkpoint != "" {
		every := f.every
		if every == 0 {
			every = max(limit/10, 1)
		}
		cfg.Checkpoint = checkpointer(f.checkpoint, every, pr, e.stderr)
	}

	res, err := train.Train(ctx, s, trainSet, cfg)
	pr.done()
	for _, w := range resWarnings(res) {
		fmt.Fprintf(e.stderr, "seine train: warning: %s\n", w)
	}
	if err != nil {
		return f.failure(e, s, res, err, hold != nil)
	}
	if err := res.Model.Save(f.out); err != nil {
		return fmt.Errorf("-out %s: %w", f.out, unwrapSave(err))
	}
	writeTrainSummary(e.stdout, f.out, res, hold != nil, f.keepBest)
	return nil
}

// check rejects flag values out of range, before any file is read.
func (f *trainFlags) check() error {
	if err := requireFlags("spec", f.spec, "data", f.data, "out", f.out); err != nil {
		return err
	}
	switch {
	case f.iterations < 0:
		return usagef("-iterations %d: want a count ≥ 0", f.iterations)
	case f.batch < 0:
		return usagef("-batch %d: want a row count ≥ 0", f.batch)
	case f.rate < 0 || math.IsNaN(f.rate) || math.IsInf(f.rate, 0):
		return usagef("-rate %g: want a finite number ≥ 0", f.rate)
	case !(f.holdout >= 0 && f.holdout < 1):
		return usagef("-holdout %g: want a fraction in (0, 1), or 0 for none", f.holdout)
	case f.patience < 0:
		return usagef("-patience %d: want a count ≥ 0", f.patience)
	case (f.keepBest || f.patience > 0) && f.holdout == 0:
		return usagef("-keep-best and -patience need a holdout: add -holdout FRACTION")
	case f.every < 0:
		return usagef("-every %d: want a count ≥ 0", f.every)
	case f.set["every"] && f.checkpoint == "":
		return usagef("-every needs -checkpoint FILE")
	case (f.calibrate || f.thresholdRule != "") && f.holdout == 0:
		return usagef("-calibrate and -threshold-rule are fitted on holdout rows: add -holdout FRACTION")
	}
	if f.thresholdRule != "" {
		r, err := parseThresholdRule(f.thresholdRule)
		if err != nil {
			return err
		}
		f.rule = r
	}
	if f.optimizer != "" {
		if _, ok := spec.ParseOptimizer(f.optimizer); !ok {
			return usagef("-optimizer %q: want one of gd, cg, lbfgs, momentum, adam", f.optimizer)
		}
	}
	return nil
}

// override writes the flags that were set into the spec's train: section
// and init seed, so that the saved model records how it was trained.
func (f *trainFlags) override(s *spec.Network, stderr io.Writer) {
	if f.set["optimizer"] {
		s.Train.Optimizer, _ = spec.ParseOptimizer(f.optimizer)
	}
	if f.set["iterations"] {
		s.Train.Iterations = f.iterations
	}
	if f.set["rate"] {
		s.Train.Rate = f.rate
	}
	if f.set["batch"] {
		s.Train.Batch = f.batch
	}
	if f.set["seed"] {
		s.Init.Seed = f.seed
	}
	o := s.Train.Optimizer
	name := o.String()
	if o == 0 {
		name = "lbfgs"
	}
	if f.set["rate"] && (o == 0 || o == spec.CG || o == spec.LBFGS) {
		fmt.Fprintf(stderr, "seine train: note: %s uses a line search; -rate is ignored\n", name)
	}
	if f.set["batch"] && o != spec.Momentum && o != spec.Adam {
		fmt.Fprintf(stderr, "seine train: note: %s uses all rows at every step; -batch is ignored\n", name)
	}
}

// failure turns an error of train.Train into the command's outcome: an
// interrupted run saves what it has; anything else writes nothing.
func (f *trainFlags) failure(e *env, s *spec.Network, res *train.Result, err error, hasHold bool) error {
	interrupted := errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded)
	switch {
	case interrupted && (res == nil || res.Model == nil || res.Run.Iterations == 0):
		return fmt.Errorf("interrupted before the first iteration ended; %s was not written", f.out)
	case interrupted:
		if serr := res.Model.Save(f.out); serr != nil {
			return fmt.Errorf("interrupted at iteration %d, and saving failed: -out %s: %w", res.Run.Iterations, f.out, unwrapSave(serr))
		}
		writeTrainSummary(e.stdout, f.out, res, hasHold, f.keepBest)
		return fmt.Errorf("interrupted at iteration %d: saved the model of iteration %d to %s", res.Run.Iterations, res.BestIter, f.out)
	case errors.Is(err, optim.ErrDiverged):
		detail := err.Error()
		var de *optim.DivergedError
		if errors.As(err, &de) {
			detail = de.Detail
		}
		hint := "a smaller -rate"
		if o := s.Train.Optimizer; o == 0 || o == spec.CG || o == spec.LBFGS {
			hint = "a larger penalty or standardized features"
		}
		return fmt.Errorf("diverged (%s); try %s; %s was not written", detail, hint, f.out)
	case errors.Is(err, optim.ErrNotFiniteStart):
		return fmt.Errorf("the cost or gradient at the initial params is not finite (try -standardize or a smaller init scale); %s was not written", f.out)
	}
	if errors.Is(err, train.ErrNotFiniteParams) {
		return fmt.Errorf("the trained params are not finite, so no model was built; %s was not written (%v)", f.out, err)
	}
	return fmt.Errorf("%v; %s was not written", err, f.out)
}

func resWarnings(res *train.Result) []string {
	if res == nil {
		return nil
	}
	return res.Warnings
}

// unwrapSave drops nn's "nn: saving model PATH:" prefix, since the caller
// names the path and flag itself.
func unwrapSave(err error) error {
	if u := errors.Unwrap(err); u != nil {
		return u
	}
	return err
}

// resumeParams reads the params of the model file at path and checks that
// its net has the shape of s.
func resumeParams(ctx context.Context, path string, s *spec.Network) ([]float64, error) {
	m, err := loadModel(ctx, path)
	if err != nil {
		return nil, fmt.Errorf("-resume: %w", err)
	}
	// Category levels are learned from the data: compare against the spec
	// with the model's levels, as training on the same rows resolves it.
	if got, want := netShape(m.Spec()), netShape(m.Encoder().Resolve(s)); got != want {
		return nil, fmt.Errorf("-resume %s: its net is %s, the spec's is %s", path, got, want)
	}
	if strings.Join(m.Classes(), ",") != strings.Join(s.Output.Classes, ",") {
		return nil, fmt.Errorf("-resume %s: its classes are %s, the spec's are %s", path, strings.Join(m.Classes(), ", "), strings.Join(s.Output.Classes, ", "))
	}
	return m.Params(), nil
}

// netShape describes the layers of s in one line, e.g.
// "16 → 24 tanh → 5 softmax", starting with the input units (the encoded
// width; for a spec whose category levels are still to be learned, the raw
// input count and "inputs").
func netShape(s *spec.Network) string {
	var b strings.Builder
	if w := s.Width(); w > 0 {
		fmt.Fprint(&b, w)
	} else {
		fmt.Fprintf(&b, "%d inputs", s.Inputs)
	}
	for _, l := range s.Hidden {
		fmt.Fprintf(&b, " → %d %s", l.Units, l.Activation)
	}
	fmt.Fprintf(&b, " → %d %s", s.Output.Units(), s.Output.Activation)
	if s.Output.Multilabel {
		b.WriteString(" (multi-label)")
	}
	return b.String()
}

// checkpointer returns the training driver's checkpoint hook that saves
// each model it is given to path. A failed save is reported once; the run
// goes on, since the final model matters more than the checkpoints.
func checkpointer(path string, every int, pr *progress, stderr io.Writer) train.Checkpoint {
	return train.Checkpoint{Every: every, Save: func(m *nn.Model) error {
		err := m.Save(path)
		if err != nil {
			pr.done()
			fmt.Fprintf(stderr, "seine train: warning: -checkpoint %s: %v; no more checkpoints\n", path, unwrapSave(err))
		}
		return err
	}}
}

// stopReasons says in words why a run stopped.
var stopReasons = map[optim.Status]string{
	optim.Running:          "not stopped: a checkpoint taken during the run",
	optim.GradConverged:    "converged: the gradient norm fell below the tolerance",
	optim.CostConverged:    "converged: the cost stopped changing",
	optim.IterationLimit:   "reached the iteration limit",
	optim.EvaluationLimit:  "reached the evaluation limit",
	optim.TimeLimit:        "reached the time limit",
	optim.Cancelled:        "interrupted",
	optim.Diverged:         "diverged",
	optim.LineSearchFailed: "the line search found no lower cost (usually a minimum up to rounding)",
	optim.Stopped:          "early stop: the holdout cost stopped falling (-patience)",
}

func stopReason(status optim.Status) string {
	if r, ok := stopReasons[status]; ok {
		return r
	}
	return status.String()
}

// writeTrainSummary writes the block that ends a training run.
func writeTrainSummary(w io.Writer, out string, res *train.Result, hasHold, keepBest bool) {
	m := res.Model
	sm := m.Summary()
	name := m.Spec().Name
	if name == "" {
		name = "(unnamed spec)"
	}
	fmt.Fprintf(w, "%s → %s\n", name, filepath.Clean(out))
	row := func(k, format string, a ...any) { fmt.Fprintf(w, "  %-13s %s\n", k, fmt.Sprintf(format, a...)) }
	if hasHold {
		row("rows", "%d training, %d holdout", sm.TrainRows, sm.HoldoutRows)
	} else {
		row("rows", "%d training, no holdout", sm.TrainRows)
	}
	row("net", "%s, %d params", netShape(m.Spec()), m.Net().NumParams())
	row("method", "%s, %d iterations, %.0f evaluations, %.2fs", sm.Method, sm.Iterations, sm.Evaluations, sm.Elapsed.Seconds())
	row("stopped", "%s", stopReason(sm.Status))
	row("final cost", "%.6g (training rows, penalty included)", sm.Cost)
	if hasHold {
		row(accuracyWord(m), "%.2f%% training, %.2f%% holdout", 100*sm.TrainAccuracy, 100*sm.HoldoutAccuracy)
		row("holdout", "cross-entropy %.6g", sm.HoldoutCost)
	} else {
		row(accuracyWord(m), "%.2f%% training", 100*sm.TrainAccuracy)
	}
	if keepBest {
		row("kept", "params of iteration %d (lowest holdout cost)", res.BestIter)
	}
	if t := m.Decision().Temperature; t != 0 && t != 1 {
		row("calibration", "temperature %.4g; holdout ECE %.4f → %.4f", t, sm.HoldoutECEBefore, sm.HoldoutECE)
	}
	for _, op := range sm.Operating {
		row("threshold", "%s ≥ %.4g (%s): holdout precision %.4f, recall %.4f, F1 %.4f", op.Class, op.Threshold, ruleText(m.Decision()), op.Precision, op.Recall, op.F1)
	}
}

// ruleText names how a decision's thresholds were chosen.
func ruleText(d nn.Decision) string {
	switch d.Rule {
	case "target-recall":
		return fmt.Sprintf("highest precision with recall ≥ %g", d.Target)
	case "target-precision":
		return fmt.Sprintf("highest recall with precision ≥ %g", d.Target)
	case "max-f1":
		return "highest F1"
	}
	return d.Rule
}

// parseThresholdRule reads -threshold-rule: max-f1, recall:R or
// precision:P with R, P in (0, 1].
func parseThresholdRule(text string) (*train.ThresholdRule, error) {
	name, num, hasNum := strings.Cut(text, ":")
	var r train.ThresholdRule
	switch name {
	case "max-f1":
		if hasNum {
			return nil, usagef("-threshold-rule %s: max-f1 takes no target", text)
		}
		r.Rule = score.MaxF1
		return &r, nil
	case "recall":
		r.Rule = score.TargetRecall
	case "precision":
		r.Rule = score.TargetPrecision
	default:
		return nil, usagef("-threshold-rule %q: want max-f1, recall:R or precision:P (e.g. recall:0.9)", text)
	}
	v, err := strconv.ParseFloat(num, 64)
	if !hasNum || err != nil || !(v > 0 && v <= 1) {
		return nil, usagef("-threshold-rule %s: want a target in (0, 1] after the colon, e.g. %s:0.9", text, name)
	}
	r.Target = v
	return &r, nil
}

// accuracyWord names the accuracy of m's kind: "exact-set accuracy" for a
// multi-label model (every class of a row right), the word evaluate and
// the report use too.
func accuracyWord(m *nn.Model) string {
	if m.Multilabel() {
		return "exact-set acc."
	}
	return "accuracy"
}
