// Command gen trains the session-triage model that examples/service embeds
// and writes it to examples/service/triage.seine.json. It trains on the
// SYNTHETIC data of examples/triage with a stratified 25% holdout (as
// `seine train -holdout 0.25` does) and prints the holdout figures.
//
// Run it from the repository root:
//
//	go run ./examples/service/gen
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

	"github.com/seine-ml/seine/examples/service/internal/triagefit"
)

func main() {
	specPath := flag.String("spec", filepath.Join("examples", "triage", "triage.yaml"), "spec file")
	dataPath := flag.String("data", filepath.Join("examples", "triage", "sessions.csv"), "CSV data file")
	out := flag.String("out", filepath.Join("examples", "service", "triage.seine.json"), "model file to write")
	flag.Parse()
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	if err := run(ctx, os.Stdout, *specPath, *dataPath, *out); err != nil {
		fmt.Fprintln(os.Stderr, "gen:", err)
		os.Exit(1)
	}
}

func run(ctx context.Context, w io.Writer, specPath, dataPath, out string) error {
	sf, err := os.Open(specPath)
	if err != nil {
		return err
	}
	defer sf.Close()
	df, err := os.Open(dataPath)
	if err != nil {
		return err
	}
	defer df.Close()
	fit, err := triagefit.Run(ctx, sf, df)
	if err != nil {
		return err
	}
	m := fit.Result.Model
	if err := m.Save(out); err != nil {
		return err
	}
	sum := m.Summary()
	fmt.Fprintf(w, "wrote %s: %d params, %s %d iterations (%s)\n", out, m.Net().NumParams(), sum.Method, sum.Iterations, sum.Status)
	fmt.Fprintf(w, "training rows %d: accuracy %.3f\n", sum.TrainRows, sum.TrainAccuracy)
	fmt.Fprintf(w, "holdout rows %d: accuracy %.3f, cross-entropy %.3f\n", fit.Report.Rows, fit.Report.Accuracy, fit.Report.CrossEntropy)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "class\trows\trecall\tprecision\tf1\t")
	for _, c := range fit.Report.PerClass {
		fmt.Fprintf(tw, "%s\t%d\t%.3f\t%.3f\t%.3f\t\n", c.Name, c.Rows, c.Recall, c.Precision, c.F1)
	}
	return tw.Flush()
}
