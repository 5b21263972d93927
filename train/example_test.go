package train_test

import (
	"context"
	"fmt"
	"strings"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

// Train a net from a spec and a data set: parse the spec, read the CSV by
// the spec's columns, keep a stratified holdout, train, and read the
// holdout figures and the fitted encoder. The data are SYNTHETIC, made up
// for the example: a ticket is "urgent" when it waited long or came by
// phone.
func ExampleTrain() {
	s, err := spec.Parse(strings.NewReader(`
version: 1
inputs:
  - name: wait_min
    missing: median
  - name: channel
    type: category
output:
  classes: [routine, urgent]
  activation: sigmoid
init:
  seed: 3
train:
  iterations: 100
`))
	if err != nil {
		fmt.Println(err)
		return
	}
	var csv strings.Builder
	csv.WriteString("wait_min,channel,class\n")
	for i := range 80 {
		wait, channel, class := i%40, []string{"mail", "chat", "phone"}[i%3], "routine"
		if wait > 25 || channel == "phone" {
			class = "urgent"
		}
		w := fmt.Sprint(wait)
		if i%17 == 0 {
			w = "" // a missing cell, filled by the median
		}
		fmt.Fprintf(&csv, "%s,%s,%s\n", w, channel, class)
	}
	set, err := data.ReadCSV(strings.NewReader(csv.String()), data.CSVOptions{
		Classes: s.Output.Classes, Columns: encode.ColumnsFor(s), MissingTokens: s.MissingTokens})
	if err != nil {
		fmt.Println(err)
		return
	}
	tr, hold, err := data.Split(set, 0.25, 7)
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := train.Train(context.Background(), s, tr, train.Options{Holdout: hold})
	if err != nil {
		fmt.Println(err)
		return
	}
	m := res.Model
	fmt.Printf("%d training rows, %d holdout rows, holdout accuracy at least 0.9: %v\n",
		m.Summary().TrainRows, m.Summary().HoldoutRows, m.Summary().HoldoutAccuracy >= 0.9)
	for _, in := range m.Encoder().Inputs() {
		fmt.Printf("%s: %v, levels %v\n", in.Name, in.Type, in.Levels)
	}
	// Output:
	// 60 training rows, 20 holdout rows, holdout accuracy at least 0.9: true
	// wait_min: number, levels []
	// channel: category, levels [chat mail phone]
}
