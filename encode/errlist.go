package encode

import (
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
	switch len(l.list.Errors) {
	case 0:
		return nil
	case 1:
		if len(l.order) == 0 {
			return l.list.Errors[0]
		}
	}
	for _, name := range l.order {
		l.list.More = append(l.list.More, data.ColumnCount{Column: name, N: l.more[name]})
	}
	return &l.list
}
