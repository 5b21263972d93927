package encode

import (
	"fmt"

	"github.com/seine-ml/seine/data"
)

// errorList collects the problems of encoding a data set as data.ReadCSV
// collects those of reading one: the first data.MaxListed with their
// positions, then counts per input.
type errorList struct {
	list  data.ErrorList
	more  map[string]int
	order []string
}

func (l *errorList) add(set *data.Set, row int, name string, err error) {
	if len(l.list.Errors) < data.MaxListed {
		e := &data.Error{Row: row + 1, Column: name, Err: err}
		if set.Lines != nil {
			// The set may be a subset: its row numbers are not the
			// file's, its lines are.
			e.Line, e.Row = set.Lines[row], 0
		}
		l.list.Errors = append(l.list.Errors, e)
		return
	}
	if l.more == nil {
		l.more = map[string]int{}
	}
	if l.more[name] == 0 {
		l.order = append(l.order, name)
	}
	l.more[name]++
}

// err returns nil, the one problem (a *data.Error), or a *data.ErrorList.
func (l *errorList) err() error {
	switch {
	case len(l.list.Errors) == 0:
		return nil
	case len(l.list.Errors) == 1 && len(l.order) == 0:
		return l.list.Errors[0]
	}
	for _, name := range l.order {
		l.list.More = append(l.list.More, data.ColumnCount{Column: name, N: l.more[name]})
	}
	return &l.list
}

// detail is a problem described in words that unwraps to its sentinels, so
// that a message says what was found and what was expected, without the
// sentinels' own text, while errors.Is still matches them.
type detail struct {
	msg   string
	kinds []error
}

func (d *detail) Error() string   { return d.msg }
func (d *detail) Unwrap() []error { return d.kinds }

// describe returns an error whose message is the formatted text and which
// unwraps to kind and to any error among args (for %v of a cause).
func describe(kind error, format string, args ...any) error {
	d := &detail{msg: fmt.Sprintf(format, args...), kinds: []error{kind}}
	for _, a := range args {
		if e, ok := a.(error); ok {
			d.kinds = append(d.kinds, e)
		}
	}
	return d
}
