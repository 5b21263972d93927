package main

import (
	"fmt"
	"io"
	"math"
	"strings"
	"time"

	"github.com/seine-ml/seine/diag"
	"github.com/seine-ml/seine/train"
)

// progress shows how a training run advances, on standard error.
//
// On a terminal it keeps one line, redrawn in place with a carriage return
// at most every redraw interval:
//
//	[########............]  120/300  cost 0.2154  holdout 94.1%  1.8s
//
// Elsewhere (a file, a pipe, a CI log) it writes plain lines: one after the
// first iteration, then one whenever both a tenth of the iteration limit
// and plainEvery of wall time have passed since the last line, so a long
// run writes at most about ten lines plus one per plainEvery.
type progress struct {
	w        io.Writer // nil: silent
	terminal bool
	limit    int // iteration limit, > 0
	start    time.Time

	lastIter int       // iteration of the last line written
	lastAt   time.Time // when the last line (or redraw) was written
	drawn    bool      // a terminal line is on screen and needs ending
	width    int       // width of the last terminal line, to blank leftovers
}

const (
	plainEvery  = 2 * time.Second
	redrawEvery = 100 * time.Millisecond
	barWidth    = 20
)

func newProgress(w io.Writer, terminal bool, limit int) *progress {
	return &progress{w: w, terminal: terminal, limit: max(limit, 1), start: time.Now()}
}

// step records iteration p; it is the train.Options.Progress callback.
func (pr *progress) step(p train.Progress) bool {
	if pr.w == nil {
		return false
	}
	now := time.Now()
	it := p.Iter
	if pr.terminal {
		if pr.drawn && now.Sub(pr.lastAt) < redrawEvery && it < pr.limit {
			return false
		}
		line := pr.bar(it, p, now)
		pad := ""
		if n := len([]rune(line)); n < pr.width {
			pad = strings.Repeat(" ", pr.width-n)
		}
		fmt.Fprint(pr.w, "\r"+line+pad)
		pr.width = len([]rune(line))
		pr.drawn, pr.lastAt = true, now
		return false
	}
	first := pr.lastAt.IsZero()
	tenth := max(pr.limit/10, 1)
	if first || (it-pr.lastIter >= tenth && now.Sub(pr.lastAt) >= plainEvery) {
		fmt.Fprintln(pr.w, pr.plain(it, p, now))
		pr.lastIter, pr.lastAt = it, now
	}
	return false
}

// done ends the terminal line so that what follows starts on a fresh line.
func (pr *progress) done() {
	if pr.w != nil && pr.terminal && pr.drawn {
		fmt.Fprintln(pr.w)
		pr.drawn = false
	}
}

func (pr *progress) bar(it int, p train.Progress, now time.Time) string {
	fill := min(barWidth*it/pr.limit, barWidth)
	var b strings.Builder
	b.WriteString("[" + strings.Repeat("#", fill) + strings.Repeat(".", barWidth-fill) + "]")
	fmt.Fprintf(&b, "  %*d/%d  cost %.4g", digits(pr.limit), it, pr.limit, p.Cost)
	if !math.IsNaN(p.HoldoutAccuracy) {
		fmt.Fprintf(&b, "  holdout %.1f%%", 100*p.HoldoutAccuracy)
	}
	fmt.Fprintf(&b, "  %s", seconds(now.Sub(pr.start)))
	return b.String()
}

func (pr *progress) plain(it int, p train.Progress, now time.Time) string {
	s := fmt.Sprintf("iteration %d/%d: cost %.4g", it, pr.limit, p.Cost)
	if !math.IsNaN(p.HoldoutAccuracy) {
		s += fmt.Sprintf(", holdout accuracy %.1f%%", 100*p.HoldoutAccuracy)
	}
	return s + ", " + seconds(now.Sub(pr.start))
}

func digits(n int) int { return len(fmt.Sprint(n)) }

// seconds formats a duration as seconds with one decimal, e.g. "12.3s".
func seconds(d time.Duration) string { return fmt.Sprintf("%.1fs", d.Seconds()) }

// fitProgress shows how a sweep, comparison or learning curve advances,
// one finished fit at a time (diag.FitDone), on standard error.
//
// On a terminal it keeps one line, redrawn in place at most every redraw
// interval (and always at the last fit):
//
//	[######..............]   3/12  λ = 0.01, fold 1/3  4.2s, about 12.6s left
//
// Elsewhere it writes a plain line per finished fit:
//
//	sweep: fit 3/12 (λ = 0.01, fold 1/3) done: 4.2s, about 12.6s left
//
// The estimate of what is left assumes the remaining fits take as long as
// the finished ones did on average.
type fitProgress struct {
	w        io.Writer // nil: silent
	terminal bool
	command  string                      // "sweep", "compare" or "curve"
	label    func(f diag.FitDone) string // what the fit is, e.g. "λ = 0.01, fold 1/3"
	prefix   string                      // put before the label, e.g. "problem 2/3: "

	lastAt time.Time
	drawn  bool
	width  int
}

func newFitProgress(w io.Writer, terminal bool, command string, label func(diag.FitDone) string) *fitProgress {
	return &fitProgress{w: w, terminal: terminal, command: command, label: label}
}

// fit records one finished fit; it is the Progress callback of the diag
// configs.
func (fp *fitProgress) fit(f diag.FitDone) {
	if fp.w == nil {
		return
	}
	now := time.Now()
	left := ""
	if f.Done < f.Total && f.Done > 0 {
		rest := time.Duration(float64(f.Elapsed) / float64(f.Done) * float64(f.Total-f.Done))
		left = ", about " + seconds(rest) + " left"
	}
	what := fp.prefix + fp.label(f)
	if !fp.terminal {
		fmt.Fprintf(fp.w, "%s: fit %d/%d (%s) done: %s%s\n", fp.command, f.Done, f.Total, what, seconds(f.Elapsed), left)
		return
	}
	if fp.drawn && now.Sub(fp.lastAt) < redrawEvery && f.Done < f.Total {
		return
	}
	fill := barWidth
	if f.Total > 0 {
		fill = min(barWidth*f.Done/f.Total, barWidth)
	}
	line := fmt.Sprintf("[%s%s]  %*d/%d  %s  %s%s", strings.Repeat("#", fill), strings.Repeat(".", barWidth-fill),
		digits(f.Total), f.Done, f.Total, what, seconds(f.Elapsed), left)
	pad := ""
	if n := len([]rune(line)); n < fp.width {
		pad = strings.Repeat(" ", fp.width-n)
	}
	fmt.Fprint(fp.w, "\r"+line+pad)
	fp.width = len([]rune(line))
	fp.drawn, fp.lastAt = true, now
}

// note writes a line of its own (e.g. which problem starts), ending a
// terminal line first.
func (fp *fitProgress) note(format string, a ...any) {
	if fp.w == nil {
		return
	}
	fp.done()
	fmt.Fprintf(fp.w, format+"\n", a...)
}

// done ends the terminal line so that what follows starts on a fresh line.
func (fp *fitProgress) done() {
	if fp.w != nil && fp.terminal && fp.drawn {
		fmt.Fprintln(fp.w)
		fp.drawn, fp.width = false, 0
	}
}

// progressFor returns the fit progress of a command: silent with -quiet.
func progressFor(e *env, quiet bool, command string, label func(diag.FitDone) string) *fitProgress {
	if quiet {
		return newFitProgress(nil, false, command, label)
	}
	return newFitProgress(e.stderr, e.terminal, command, label)
}
