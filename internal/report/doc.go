// Package report renders seine's report: one self-contained HTML page
// about a model scored on a labelled data set — the spec and training
// summary, the data, the metric table with one row per class, the
// confusion matrix, the ROC and precision–recall curves with the operating
// point, the reliability diagram and expected calibration error, the
// permutation importance of each input, the decision the model makes and
// the cautions that go with it.
//
// The page is built with html/template and holds everything it shows: the
// styles are inline, the plots are inline SVG, and nothing is fetched (a
// Content-Security-Policy of default-src 'none' says so to the browser, so
// a stray reference shows up as a console error). It reads on a laptop
// screen and prints to A4.
//
// Every figure is written as text in an element that names it, so that
// tools and tests can read the page back: the headline figures carry ids
// (id="accuracy", "cross-entropy", "macro-f1", "macro-roc-auc",
// "macro-ap", "ece", "hamming-loss"), and each figure element has
// data-figure (the key of `seine evaluate -json`: accuracy, roc_auc, …)
// and data-value (the float64 written so that it reads back exactly),
// inside rows marked data-class for per-class figures and data-input for
// input importance. The visible text is the value as the page formats it
// (see Format).
//
// Nothing here opens files or prints; the caller passes the figures in
// and writes the page where it wants.
package report
