// Command multilabel trains a net whose rows may carry several classes at
// once: fault tags of a centrifugal pump (cavitation, bearing-wear,
// misalignment, clogging, or none) from one reading of its sensors. The
// output layer has one sigmoid unit per tag, each an independent yes/no
// question, trained on the summed binary cross-entropy (see package nn).
//
// THE DATA IS SYNTHETIC: readings.csv is written by
// `go run ./examples/multilabel/gen`.
//
// The program holds out a stratified quarter of the rows (seed = the
// spec's init seed), trains on the rest and prints, for the holdout,
// the exact-set match rate (every tag of the row right), the Hamming loss
// (share of wrong row-tag decisions) and per-tag precision, recall and F1,
// deciding a tag present when its probability is at least 0.5.
//
// Run it from the repository root:
//
//	go run ./examples/multilabel
package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"text/tabwriter"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
	"gonum.org/v1/gonum/mat"
)

// holdout is the share of rows kept out of training and scored.
const holdout = 0.25

func main() {
	dir := filepath.Join("examples", "multilabel")
	specPath := flag.String("spec", filepath.Join(dir, "pump.yaml"), "spec file")
	dataPath := flag.String("data", filepath.Join(dir, "readings.csv"), "CSV data file, tags separated by '|'")
	flag.Parse()
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	if err := run(ctx, os.Stdout, *specPath, *dataPath); err != nil {
		fmt.Fprintln(os.Stderr, "multilabel:", err)
		os.Exit(1)
	}
}

// outcome is what run measured.
type outcome struct {
	train, holdout *data.Set
	report         *score.Report // on the holdout rows
	noTags         float64       // share of holdout rows with no tag
}

func run(ctx context.Context, w io.Writer, specPath, dataPath string) error {
	o, err := fit(ctx, specPath, dataPath)
	if err != nil {
		return err
	}
	rep := o.report
	fmt.Fprintf(w, "SYNTHETIC pump readings: %d training rows, %d holdout rows, %d tags\n",
		o.train.Rows(), o.holdout.Rows(), len(rep.Classes))
	fmt.Fprintf(w, "holdout exact-set match %.3f (tagging nothing would score %.3f)\n", rep.Accuracy, o.noTags)
	fmt.Fprintf(w, "holdout Hamming loss    %.4f\n", *rep.HammingLoss)
	fmt.Fprintf(w, "holdout cross-entropy   %.4f (summed over tags)\n", rep.CrossEntropy)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "tag\trows\tpredicted\tprecision\trecall\tf1\t")
	for _, c := range rep.PerClass {
		fmt.Fprintf(tw, "%s\t%d\t%d\t%.3f\t%.3f\t%.3f\t\n", c.Name, c.Rows, c.Predicted, c.Precision, c.Recall, c.F1)
	}
	fmt.Fprintf(tw, "macro\t\t\t\t\t%.3f\t\n", rep.MacroF1)
	return tw.Flush()
}

// fit reads the spec and data, trains on a stratified split and scores
// the holdout rows.
func fit(ctx context.Context, specPath, dataPath string) (*outcome, error) {
	sf, err := os.Open(specPath)
	if err != nil {
		return nil, err
	}
	defer sf.Close()
	s, err := spec.Parse(sf)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", specPath, err)
	}
	if !s.Output.Multilabel {
		return nil, fmt.Errorf("%s: the output must be multilabel", specPath)
	}
	df, err := os.Open(dataPath)
	if err != nil {
		return nil, err
	}
	defer df.Close()
	set, err := data.ReadCSV(df, data.CSVOptions{Classes: s.Output.Classes, Features: s.Features, Multilabel: true})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", dataPath, err)
	}
	tr, ho, err := data.Split(set, holdout, s.Init.Seed)
	if err != nil {
		return nil, err
	}
	res, err := train.Train(ctx, s, tr, train.Options{Holdout: ho})
	if err != nil {
		return nil, err
	}
	var p mat.Dense
	res.Model.ProbabilitiesBatch(&p, ho.X)
	rep, err := score.Evaluate(&p, ho.Y, ho.Classes, score.Options{Multilabel: true})
	if err != nil {
		return nil, err
	}
	none := 0
	for _, l := range ho.Labels() {
		if l < 0 {
			none++
		}
	}
	return &outcome{train: tr, holdout: ho, report: rep, noTags: float64(none) / float64(ho.Rows())}, nil
}
