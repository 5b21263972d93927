package encode

import (
	"fmt"
	"strings"

	"github.com/seine-ml/seine/data"
)

// maxListed is the number of problems an encoding error lists before it
// only counts them per column.
const maxListed = 20

// errorList collects the problems of encoding a data set: the first
// maxListed with their positions, then counts per input.
type errorList struct {
	listed []*data.Error
	more   []int // per input index: problems not listed
	names  []string
	total  int
}

func (l *errorList) add(set *data.Set, row int, name string, j int, err error) {
	l.total++
	if len(l.listed) < maxListed {
		e := &data.Error{Row: row + 1, Column: name, Field: 0, Err: err}
		if set.Lines != nil {
			e.Line = set.Lines[row]
			e.Row = 0 // the set may be a subset: the line is the position that holds
		}
		l.listed = append(l.listed, e)
		return
	}
	for len(l.more) <= j {
		l.more = append(l.more, 0)
		l.names = append(l.names, "")
	}
	l.more[j]++
	l.names[j] = name
}

func (l *errorList) err() error {
	if l.total == 0 {
		return nil
	}
	if l.total == 1 {
		return l.listed[0]
	}
	return &Errors{Listed: l.listed, More: l.moreLines(), Total: l.total}
}

func (l *errorList) moreLines() []string {
	var out []string
	for j, n := range l.more {
		if n > 0 {
			out = append(out, fmt.Sprintf("and %d more in column %q", n, l.names[j]))
		}
	}
	return out
}

// Errors is the list of problems found encoding a data set: the first 20
// with their positions (*data.Error, whose Err wraps the sentinel), then a
// line per column counting the rest. errors.Is and errors.As see every
// listed problem.
type Errors struct {
	Listed []*data.Error
	More   []string
	Total  int
}

func (e *Errors) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%d problems:", e.Total)
	for _, p := range e.Listed {
		b.WriteString("\n")
		b.WriteString(p.Error())
	}
	for _, m := range e.More {
		b.WriteString("\n")
		b.WriteString(m)
	}
	return b.String()
}

// Unwrap returns the listed problems.
func (e *Errors) Unwrap() []error {
	out := make([]error, len(e.Listed))
	for i, p := range e.Listed {
		out[i] = p
	}
	return out
}
