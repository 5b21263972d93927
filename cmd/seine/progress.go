package main

import (
	"fmt"
	"io"
	"math"
	"strings"
	"time"

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

// step records iteration p; it is the train.Config.Progress callback.
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
