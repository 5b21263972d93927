package encode_test

import (
	"fmt"
	"math"
	"strings"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/spec"
)

// Fit an encoder on a few training rows (SYNTHETIC, made up for the
// example), then encode a record that has a missing number and a known
// plan, and one with a plan never seen in training.
func Example() {
	s, err := spec.Parse(strings.NewReader(`
version: 1
inputs:
  - name: tenure
    missing: median
  - name: plan
    type: category
    unknown: ignore
output:
  classes: [stays, leaves]
`))
	if err != nil {
		fmt.Println(err)
		return
	}
	rows := "tenure,plan,class\n3,basic,leaves\n,pro,stays\n12,team,stays\n5,basic,leaves\n30,pro,stays\n"
	set, err := data.ReadCSV(strings.NewReader(rows), data.CSVOptions{
		Classes: s.Output.Classes, Columns: encode.ColumnsFor(s), MissingTokens: s.MissingTokens,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	enc, _, err := encode.Fit(s, set, encode.Options{NoScale: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, in := range enc.Inputs() {
		fmt.Printf("%s: %v, units %d–%d, levels %v, fill %v\n", in.Name, in.Type, in.Offset, in.Offset+in.Units()-1, in.Levels, in.Fill)
	}
	units := make([]float64, enc.Width())
	for _, rec := range []map[string]any{
		{"tenure": nil, "plan": "team"},
		{"tenure": 7.0, "plan": "enterprise"},
		{"tenure": 7.0},
	} {
		coded, err := enc.CodeRecord(nil, rec)
		if err != nil {
			fmt.Println("error:", err)
			continue
		}
		fmt.Println(enc.Expand(units, coded))
	}
	// Output:
	// tenure: number, units 0–0, levels [], fill 8.5
	// plan: category, units 1–3, levels [basic pro team], fill NaN
	// [8.5 0 0 1]
	// [7 0 0 0]
	// error: field "plan": the record has no field of that name; send null for a missing value
}

// A service binds its column order once; each row is then coded without
// looking names up and without allocating.
func ExampleEncoder_Layout() {
	enc, err := encode.New([]encode.Input{
		{Name: "req_per_min", Mean: 10, Scale: 5, Fill: math.NaN()},
		{Name: "agent", Type: spec.CategoryInput, Levels: []string{"browser", "cli"}, Missing: spec.MissingLevel},
	}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	lay, err := enc.Layout([]string{"agent", "req_per_min"})
	if err != nil {
		fmt.Println(err)
		return
	}
	coded := make([]float64, enc.NumInputs())
	units := make([]float64, enc.Width())
	for _, row := range [][]encode.Value{
		{encode.Text("cli"), encode.Number(20)},
		{encode.Missing, encode.Number(5)},
		{encode.Text("cli"), encode.Missing},
	} {
		if err := lay.Code(coded, row); err != nil {
			fmt.Println("error:", err)
			continue
		}
		fmt.Println(enc.Expand(units, coded))
	}
	// Output:
	// [2 0 1 0]
	// [-1 0 0 1]
	// error: field "req_per_min": missing value; the input's missing rule is refuse: set `missing:` in the spec to fill it
}
