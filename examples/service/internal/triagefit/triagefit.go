// Package triagefit trains the session-triage model that the service
// example embeds, the way `seine train -holdout 0.25` does: a stratified
// quarter of the rows is held out (split with the spec's init seed), the
// net is trained on the rest with the spec's training defaults, and the
// holdout rows are scored.
//
// The data is SYNTHETIC (see examples/triage). Training is deterministic:
// the same spec and data give bit-identical params on the same platform.
package triagefit

import (
	"context"
	"fmt"
	"io"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

// Holdout is the share of rows kept out of training and scored.
const Holdout = 0.25

// Fit is the outcome of one training run.
type Fit struct {
	Result  *train.Result // Result.Model is the trained model
	Holdout *data.Set     // the rows kept out of training
	Report  *score.Report // the model's fit to the holdout rows
}

// Run reads a spec and a CSV data set, trains the spec's net on all rows
// but a stratified Holdout share and scores the model on the held-out rows.
func Run(ctx context.Context, specYAML, csv io.Reader) (*Fit, error) {
	s, err := spec.Parse(specYAML)
	if err != nil {
		return nil, fmt.Errorf("spec: %w", err)
	}
	set, err := data.ReadCSV(csv, data.CSVOptions{
		Classes:       s.Output.Classes,
		Columns:       encode.ColumnsFor(s),
		MissingTokens: s.MissingTokens,
		Multilabel:    s.Output.Multilabel,
	})
	if err != nil {
		return nil, fmt.Errorf("data: %w", err)
	}
	tr, ho, err := data.Split(set, Holdout, s.Init.Seed)
	if err != nil {
		return nil, err
	}
	res, err := train.Train(ctx, s, tr, train.Options{Holdout: ho})
	if err != nil {
		return nil, err
	}
	p, err := res.Model.ProbabilitiesSet(ho)
	if err != nil {
		return nil, err
	}
	rep, err := score.Evaluate(p, ho.Y, ho.Classes, score.Options{Multilabel: s.Output.Multilabel})
	if err != nil {
		return nil, err
	}
	return &Fit{Result: res, Holdout: ho, Report: rep}, nil
}
