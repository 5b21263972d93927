package main

import (
	"bytes"
	"io"
	"os"
	"runtime/debug"
	"strconv"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

// toolBytes is what `seine train` is resident with before the data counts:
// the program's code and the runtime. Measured with /usr/bin/time -v: the
// 3,000-row triage example (under 2 MB of data and workspaces) peaks at
// 18 MB, `seine version` at 11 MB.
const toolBytes = 16 << 20

// trainingMemory is the tool's estimate of what `seine train` holds at its
// peak, in bytes, in the parts that inspect prints.
type trainingMemory struct {
	// Read is the data as read: per row, one float64 per raw input, one
	// per class (y) and the line number, for the training and holdout rows.
	Read int64
	// Objective is nn.Net.TrainingBytes of the training rows: the encoded
	// rows and y, the workspaces of the workers and the gradient.
	Objective int64
	// Holdout is the same for the holdout rows, which are scored after
	// every iteration.
	Holdout int64
	// State is the optimizer's vectors (optimState).
	State int64
}

// estimateTraining returns the memory that training the net of s on rows
// training rows and holdout holdout rows takes. net must have the width
// that training compiles (levels resolved, or stand-ins).
func estimateTraining(net *nn.Net, s *spec.Network, rows, holdout int) trainingMemory {
	batch := s.Train.Batch
	if batch == 0 && (s.Train.Optimizer == spec.Momentum || s.Train.Optimizer == spec.Adam) {
		batch = train.DefaultBatch
	}
	_, words := optimState(s.Train.Optimizer)
	t := trainingMemory{
		Read:      8 * int64(rows+holdout) * int64(s.Inputs+len(s.Output.Classes)+1),
		Objective: net.TrainingBytes(rows, nn.ObjectiveOptions{Batch: batch}),
		State:     8 * int64(words) * int64(net.NumParams()),
	}
	if holdout > 0 {
		t.Holdout = net.TrainingBytes(holdout, nn.ObjectiveOptions{})
	}
	return t
}

// Peak is the most memory training holds at once: the tool itself and the
// data as read, plus the larger of the copy that splitting off a holdout
// makes of them (while they are still live) and what training adds (the
// rows are encoded while they are held as read; train drops the training
// rows as read after, train.Options.DropRows).
func (t trainingMemory) Peak() int64 {
	return toolBytes + t.Read + max(t.split(), t.Objective+t.Holdout+t.State)
}

// split is the copy of the rows as read that splitting off a holdout
// makes: all of them, or nothing without a holdout.
func (t trainingMemory) split() int64 {
	if t.Holdout == 0 {
		return 0
	}
	return t.Read
}

// heapLimit is the soft memory limit `seine train` gives Go's runtime:
// the estimate without the program itself. Go's collector otherwise lets
// the heap grow to twice what is live between collections (GOGC=100),
// which on large data sets took the peak to twice the estimate; with the
// limit it collects more often as the heap nears it. The limit is soft: a
// run that needs more still gets it, at the cost of more collections. It
// is never below 64 MiB: collecting harder saves nothing that matters
// there.
func (t trainingMemory) heapLimit() int64 {
	return max(t.Peak()-toolBytes, 64<<20)
}

// limitHeap sets the runtime's soft memory limit for training on rows
// rows, holdout of them split off, unless the user set GOMEMLIMIT. set, when
// not nil, holds the rows read, whose texts give the categories' widths;
// before the rows are read, categories count two levels each.
func limitHeap(s *spec.Network, set *data.Set, rows, holdout int) {
	if os.Getenv("GOMEMLIMIT") != "" || rows < 1 {
		return
	}
	net, err := nn.Compile(levelsSeen(s, set))
	if err != nil {
		return // training reports it
	}
	t := estimateTraining(net, s, rows-holdout, holdout)
	debug.SetMemoryLimit(t.heapLimit())
}

// rowsGuess guesses the rows of the CSV file at path from its size and
// the lines in its first MiB, so that the heap can be limited while the
// rows are read; 0 when path is not a regular file or is too short to
// tell. A row of cols columns takes at least cols bytes (separators and
// line end), so the guess never exceeds size/cols, whatever the first
// MiB holds (a run of blank lines, say): room set aside for it is at
// most 8 bytes per byte of the file. The guess is only a guide, to the collector and to the reader
// (data.CSVOptions.RowsHint): the limit is set again from the rows read.
func rowsGuess(path string, cols int) int {
	if fi, err := os.Stat(path); err != nil || !fi.Mode().IsRegular() || fi.Size() < 1<<20 {
		return 0 // a small file needs no limit; a FIFO must not be opened twice
	}
	f, err := os.Open(path)
	if err != nil {
		return 0
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return 0
	}
	buf := make([]byte, 1<<20)
	n, _ := io.ReadFull(f, buf)
	lines := bytes.Count(buf[:n], []byte{'\n'})
	if n == 0 || lines < 2 {
		return 0
	}
	guess := fi.Size() * int64(lines) / int64(n)
	return int(min(guess, fi.Size()/int64(max(cols, 1))))
}

// levelsSeen returns s, or a copy of s in which each category input without
// levels has as many stand-in levels as set has distinct texts in its
// column (at least one): the width that training will compile. With no set
// it counts two levels per category (encode.Placeholder).
func levelsSeen(s *spec.Network, set *data.Set) *spec.Network {
	if s.Resolved() || s.Types == nil {
		return s
	}
	if set == nil {
		return encode.Placeholder(s)
	}
	c := s.Clone()
	for i := range c.Types {
		if c.Types[i].Units() != 0 {
			continue
		}
		n := 1
		if i < len(set.Texts) {
			n = max(n, len(set.Texts[i]))
		}
		c.Types[i].Levels = make([]string, n)
		for k := range c.Types[i].Levels {
			c.Types[i].Levels[k] = "\x00level-" + strconv.Itoa(k+1)
		}
	}
	return c
}
