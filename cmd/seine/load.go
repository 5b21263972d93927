package main

import (
	"errors"
	"fmt"
	"os"
	"strings"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// loadSpec reads and checks the spec file at path. Every problem is
// reported as "path:line:column: field: message", one per line.
func loadSpec(path string) (*spec.Network, error) {
	if path == "" {
		return nil, usagef("-spec is required")
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	s, err := spec.Parse(f)
	if err != nil {
		return nil, prefixLines(path, err)
	}
	return s, nil
}

// prefixLines puts "path:" in front of every line of err's message, so that
// each problem of a spec.ErrorList names the file. The returned error still
// wraps err.
func prefixLines(path string, err error) error {
	lines := strings.Split(err.Error(), "\n")
	for i, l := range lines {
		lines[i] = path + ":" + l
	}
	return &wrapped{msg: strings.Join(lines, "\n"), err: err}
}

type wrapped struct {
	msg string
	err error
}

func (w *wrapped) Error() string { return w.msg }
func (w *wrapped) Unwrap() error { return w.err }

// dataFor returns the CSV options that read a data file for the net that s
// describes: the spec's classes, its feature names when it lists them (else
// the count of inputs), and its multi-label setting.
func dataFor(s *spec.Network, label string) data.CSVOptions {
	opt := data.CSVOptions{Label: label, Classes: s.Output.Classes, Multilabel: s.Output.Multilabel}
	if s.Features != nil {
		opt.Features = s.Features
	} else {
		opt.Inputs = s.Inputs
	}
	return opt
}

// loadData reads the CSV file at path with opt; errors read
// "path: line 7 (row 6), column "x": ...".
func loadData(path string, opt data.CSVOptions) (*data.Set, error) {
	if path == "" {
		return nil, usagef("-data is required")
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	set, err := data.ReadCSV(f, opt)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if set.Rows() == 0 {
		return nil, fmt.Errorf("%s: %w", path, data.ErrEmpty)
	}
	return set, nil
}

// loadModel reads the model file at path.
func loadModel(path string) (*nn.Model, error) {
	if path == "" {
		return nil, usagef("-model is required")
	}
	m, err := nn.Load(path)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			return nil, pe
		}
		return nil, err
	}
	return m, nil
}
