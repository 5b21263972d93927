package score

import (
	"fmt"
)

// MinClassRows is the number of rows of a class below which its figures
// are warned about: with fewer than 5 rows a single row moves its recall by
// 20 points or more (common practice).
const MinClassRows = 5

// Warnings returns, in words, where the figures of r mislead:
//
//   - the accuracy is below the majority-class share, so always answering
//     the largest class would score higher;
//   - a class has no rows, or fewer than MinClassRows, so its precision,
//     recall and F1 rest on a handful of rows;
//   - a rare class (under 10% of the rows) has a recall below half its
//     precision: the model is cautious with it and misses most of it, which
//     class weights or an operating threshold can trade back.
//
// what names the rows in the messages, e.g. "holdout". tilted says the
// model's decisions lean away from the most probable class on purpose
// (class weights, or an operating threshold chosen for recall): accuracy
// below the majority share is then the expected price and is not warned
// about.
func Warnings(r *Report, what string, tilted bool) []string {
	var out []string
	if !r.Multilabel && r.Rows > 0 && !tilted {
		major, share := "", 0.0
		for _, c := range r.PerClass {
			if s := float64(c.Rows) / float64(r.Rows); s > share {
				major, share = c.Name, s
			}
		}
		if r.Accuracy < share {
			out = append(out, fmt.Sprintf("accuracy %.4f on the %s rows is below the share of the largest class %q (%.4f): always answering %q would score higher; look at per-class recall, class weights or an operating threshold", r.Accuracy, what, major, share, major))
		}
	}
	for _, c := range r.PerClass {
		switch {
		case c.Rows == 0:
			out = append(out, fmt.Sprintf("class %q has no %s rows: its recall is undefined and its precision counts only false alarms", c.Name, what))
		case c.Rows < MinClassRows:
			out = append(out, fmt.Sprintf("class %q has only %d %s rows: its figures rest on a handful of rows", c.Name, c.Rows, what))
		case float64(c.Rows) < 0.1*float64(r.Rows) && c.Precision > 0 && c.Recall < c.Precision/2:
			out = append(out, fmt.Sprintf("rare class %q (%d of %d %s rows): recall %.4f is far below precision %.4f; consider `class_weights: balanced` or an operating threshold (train -threshold-rule)", c.Name, c.Rows, r.Rows, what, c.Recall, c.Precision))
		}
	}
	return out
}
