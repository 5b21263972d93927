package data

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// Sentinel errors. A *Error from ReadCSV (alone, or each entry of an
// *ErrorList) wraps one of these, so callers test the kind of problem with
// errors.Is and its position with errors.As.
var (
	ErrEmpty           = errors.New("data: no data")                         // empty file, or a header and no rows
	ErrNoHeader        = errors.New("data: missing header")                  // first row is all numbers
	ErrFieldCount      = errors.New("data: wrong number of fields")          // a row has more or fewer fields than the header
	ErrEmptyField      = errors.New("data: empty field")                     // a feature or single-label cell is empty
	ErrMissingValue    = errors.New("data: missing value")                   // a missing token in a column that refuses missing cells
	ErrNotNumber       = errors.New("data: not a number")                    // a feature cell does not parse as a number
	ErrNotFinite       = errors.New("data: not a finite number")             // NaN, ±Inf, or out of float64 range
	ErrUnknownClass    = errors.New("data: unknown class")                   // a label not among CSVOptions.Classes
	ErrNoClasses       = errors.New("data: no classes")                      // labels present but no class found
	ErrMissingColumn   = errors.New("data: missing column")                  // a named label or feature column is absent
	ErrDuplicateColumn = errors.New("data: duplicate column name")           // two header cells share a name
	ErrFeatureCount    = errors.New("data: wrong number of features")        // CSVOptions.Inputs does not match the file
	ErrTooLarge        = errors.New("data: input too large")                 // MaxColumns, MaxLineBytes or MaxRows exceeded
	ErrQuote           = errors.New("data: misplaced quote")                 // RFC 4180 quoting broken
	ErrLineEnds        = errors.New("data: unsupported line ends")           // a carriage return not followed by a line feed (CR-only line ends)
	ErrRead            = errors.New("data: read failed")                     // the underlying reader failed
	ErrOptions         = errors.New("data: invalid options")                 // CSVOptions contradict themselves
	ErrHoldout         = errors.New("data: holdout must be in (0, 1)")       // Split's holdout out of range
	ErrTooFewRows      = errors.New("data: too few rows")                    // a split or fold would be empty
	ErrFolds           = errors.New("data: fold count must be in [2, rows]") // Folds' k out of range
)

// Error is a problem at a position in a CSV file. Its message reads
//
//	line 7 (row 6), column "petal_width": "abc" is not a number
//
// with no package prefix, so that a caller can put the file name in front.
type Error struct {
	Line   int    // 1-based line of the file, as a spreadsheet or editor shows it (the header is line 1 unless blank lines precede it)
	Row    int    // 1-based data row (the first row after the header is row 1); 0 for the header or the file as a whole
	Column string // column name from the header; "" if none applies
	Field  int    // 1-based field index within the row; 0 if none applies
	Err    error  // the problem; errors.Is(err, ErrNotNumber) etc. see through it
}

// Error formats the position, then the problem.
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString("line ")
	b.WriteString(strconv.Itoa(e.Line))
	if e.Row > 0 {
		fmt.Fprintf(&b, " (row %d)", e.Row)
	}
	switch {
	case e.Column != "":
		fmt.Fprintf(&b, ", column %q", e.Column)
	case e.Field > 0:
		fmt.Fprintf(&b, ", field %d", e.Field)
	}
	b.WriteString(": ")
	if e.Err == nil {
		b.WriteString("unknown error")
	} else {
		b.WriteString(e.Err.Error())
	}
	return b.String()
}

// Unwrap returns the wrapped problem.
func (e *Error) Unwrap() error { return e.Err }

// MaxListed is the number of cell problems an ErrorList lists one by one;
// past it, problems are only counted per column.
const MaxListed = 20

// ErrorList is every problem ReadCSV found in the cells of a file. Its
// message has one problem per line, in file order (row, then field), the
// first MaxListed of them, then one line per column with more:
//
//	line 3 (row 2), column "plan": "team" is not a number; declare `type: category` for a text column
//	line 5 (row 4), column "tenure": missing value "?"; the spec's missing rule for this input is refuse: set `missing:` (e.g. mean, median, mode)
//	…
//	and 7 more in column "plan"
//
// When reading stopped at a problem with the file's structure (a field
// count, a quote, a size limit), that problem is the last entry of Errors,
// even past MaxListed. Unwrap returns Errors, so errors.As with a *Error
// finds the first problem and errors.Is matches the sentinel of any listed
// one. Its memory is bounded: past MaxListed only a count per column grows.
type ErrorList struct {
	// Errors are the problems listed, in file order; never empty.
	Errors []*Error
	// More counts the cell problems past the first MaxListed, per column,
	// in header order; nil when there are none.
	More []ColumnCount
}

// ColumnCount is a number of problems in one column.
type ColumnCount struct {
	Column string // column name from the header
	N      int    // problems not listed
}

// Error lists the problems, one per line.
func (l *ErrorList) Error() string {
	var b strings.Builder
	for i, e := range l.Errors {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(e.Error())
	}
	for _, m := range l.More {
		fmt.Fprintf(&b, "\nand %d more in column %q", m.N, m.Column)
	}
	return b.String()
}

// Unwrap returns the listed problems.
func (l *ErrorList) Unwrap() []error {
	out := make([]error, len(l.Errors))
	for i, e := range l.Errors {
		out[i] = e
	}
	return out
}

// newErrorList makes an ErrorList of the listed problems and the counts
// per field past them (more may be nil), naming fields by names.
func newErrorList(list []*Error, more []int, names []string) *ErrorList {
	l := &ErrorList{Errors: list}
	for j, n := range more {
		if n > 0 {
			l.More = append(l.More, ColumnCount{Column: names[j], N: n})
		}
	}
	return l
}

// detail is a problem described in words that unwraps to a sentinel, so
// that Error's message says what was found and what was expected while
// errors.Is still matches the sentinel.
type detail struct {
	msg   string
	kind  error
	cause error // an underlying error, or nil
}

func (d *detail) Error() string { return d.msg }

func (d *detail) Unwrap() []error {
	if d.cause == nil {
		return []error{d.kind}
	}
	return []error{d.kind, d.cause}
}

// describe returns an error whose message is the formatted text and which
// unwraps to kind.
func describe(kind error, format string, args ...any) error {
	return &detail{msg: fmt.Sprintf(format, args...), kind: kind}
}
