package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"github.com/seine-ml/seine/data"
)

// usageDoc says what a command reads and writes, with one example that runs
// from the repository root as written (the README's demo files).
type usageDoc struct {
	reads, writes, example string
}

// usageDocs holds the usageDoc of each command by name; seine help prints
// them, and a test checks that every command has one.
var usageDocs = map[string]usageDoc{
	"train": {"a spec (YAML) and a CSV file with a header and a label column", "a model file (-out), replaced atomically; progress and warnings on standard error",
		"seine train -spec examples/triage/triage.yaml -data examples/triage/sessions.csv -out triage.seine.json -holdout 0.25"},
	"evaluate": {"a model file and a labelled CSV file", "the figures on standard output (-json for JSON); plots with -plot, -roc, -pr, -reliability",
		"seine evaluate -model triage.seine.json -data examples/triage/sessions.csv"},
	"predict": {"a model file and a CSV file (the label column may be absent)", "CSV predictions on standard output, or -out",
		"seine predict -model triage.seine.json -data examples/triage/sessions.csv -probabilities -keep req_per_min"},
	"report": {"a model file and a labelled CSV file", "one self-contained HTML page (-out)",
		"seine report -model triage.seine.json -data examples/triage/sessions.csv -out triage.html"},
	"export": {"a model file", "an ONNX model (-out)",
		"seine export -model triage.seine.json -out triage.onnx"},
	"gradient-check": {"a spec, and optionally a CSV file (-data)", "the check's verdict on standard output",
		"seine gradient-check -spec examples/triage/triage.yaml"},
	"inspect": {"a spec or a model file", "a description on standard output",
		"seine inspect -model triage.seine.json"},
	"compare": {"a spec and a labelled CSV file", "a table (or -json) on standard output; plots with -plot",
		"seine compare -spec examples/triage/triage.yaml -data examples/triage/sessions.csv -optimizers lbfgs,adam -iterations 30"},
	"sweep": {"a spec and a labelled CSV file", "a table (or -json) on standard output; a plot with -plot",
		"seine sweep -spec examples/triage/triage.yaml -data examples/triage/sessions.csv -l2 0.3,3,30 -iterations 60"},
	"curve": {"a spec and a labelled CSV file", "a table (or -json) on standard output; a plot with -plot",
		"seine curve -spec examples/triage/triage.yaml -data examples/triage/sessions.csv -steps 3 -iterations 60"},
	"merge": {"the JSON parts of a sharded sweep, compare or curve", "the whole run's table (or -json) and plots",
		"seine merge part-0.json part-1.json"},
	"version": {"nothing", "the version, Go version, platform and matrix backend on standard output",
		"seine version"},
	"completion": {"nothing", "a shell completion script on standard output",
		"seine completion bash > /etc/bash_completion.d/seine"},
}

// writeUsageDoc writes the reads/writes/example lines of command c.
func writeUsageDoc(w io.Writer, c string, indent string) {
	d, ok := usageDocs[c]
	if !ok {
		return
	}
	fmt.Fprintf(w, "%sreads:   %s\n%swrites:  %s\n%sexample: %s\n", indent, d.reads, indent, d.writes, indent, d.example)
}

// boolFlagValue explains the common slip of giving a boolean flag its value
// as a separate argument (`-standardize false`), which flag parsing stops
// at: it returns a usage error naming the form that works, or nil when the
// first positional argument is not such a value.
func boolFlagValue(fs *flag.FlagSet, args []string) error {
	i := len(args) - fs.NArg()
	if i < 1 || i >= len(args) {
		return nil
	}
	v := args[i]
	if v != "true" && v != "false" {
		return nil
	}
	name := strings.TrimLeft(args[i-1], "-")
	f := fs.Lookup(name)
	if f == nil {
		return nil
	}
	if b, ok := f.Value.(interface{ IsBoolFlag() bool }); ok && b.IsBoolFlag() {
		return usagef("-%s takes no separate value: write -%s=%s", name, name, v)
	}
	return nil
}

// flagsOf returns the flag set command c defines, by running it with -h
// into a discarding environment; completion scripts are made from it.
func flagsOf(c *command) *flag.FlagSet {
	e := &env{stdout: io.Discard, stderr: io.Discard}
	err := c.run(nil, e, []string{"-h"})
	if err != nil && !errors.Is(err, flag.ErrHelp) {
		return nil
	}
	return e.flags
}

// commaValue is the -comma flag: the field separator of CSV input, one
// character, or "tab".
type commaValue rune

func (c *commaValue) String() string {
	switch rune(*c) {
	case 0:
		return ","
	case '\t':
		return "tab"
	}
	return string(rune(*c))
}

func (c *commaValue) Set(s string) error {
	switch s {
	case "tab", `\t`, "\t":
		*c = '\t'
		return nil
	}
	r := []rune(s)
	if len(r) != 1 || r[0] == '"' || r[0] == '\r' || r[0] == '\n' {
		return fmt.Errorf("want one character such as ';' or the word tab")
	}
	*c = commaValue(r[0])
	return nil
}

// commaFlag defines -comma on fs.
func commaFlag(fs *flag.FlagSet) *commaValue {
	c := new(commaValue)
	fs.Var(c, "comma", "field `SEPARATOR` of the CSV input: one character such as ';', or tab (default ',')")
	return c
}

// withComma sets the separator of opt from -comma.
func withComma(opt data.CSVOptions, c *commaValue) data.CSVOptions {
	opt.Comma = rune(*c)
	return opt
}
