package data

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"gonum.org/v1/gonum/mat"
)

// CSVOptions say how ReadCSV reads a file. The zero value reads a file
// whose last column is a single-label class column and every other column
// a feature, with ',' between fields and the default size limits.
type CSVOptions struct {
	// Label is the name of the label column; "" means the last column.
	Label string
	// NoLabel says the file has no label column (prediction input): every
	// column is a feature and the Set's Y is nil. When Label names a column
	// that is absent, that is then fine; when it is present, that column is
	// skipped (neither feature nor label).
	NoLabel bool
	// Classes are the known classes in output order (from the spec). A label
	// not among them is an error naming its row and value. nil collects the
	// classes found, sorted: numerically when all are integers, else by
	// byte order.
	Classes []string
	// Features picks feature columns by name, in this order; a name absent
	// from the header is an error naming it. nil takes every column but the
	// label, in file order.
	Features []string
	// Inputs, when > 0 and Features is nil, is the number of feature columns
	// the file must have. When Features is set it must equal len(Features).
	Inputs int
	// Multilabel says label cells list classes separated by '|'; an empty
	// cell is a row with no class.
	Multilabel bool
	// Comma is the field separator; 0 means ','. It may not be '"', '\r',
	// '\n', '|' with Multilabel, or an invalid rune.
	Comma rune
	// MaxColumns bounds the header's field count, checked before any
	// per-column storage is made; 0 means 10,000.
	MaxColumns int
	// MaxLineBytes bounds each physical line (and each record, which may
	// span lines inside quotes) in bytes, excluding the line end; 0 means
	// 1 MiB. A longer line is an error naming it, found without holding the
	// line in memory.
	MaxLineBytes int
	// MaxRows bounds the number of data rows; 0 means no limit.
	MaxRows int
	// Columns, when non-nil, picks the feature columns by name in this
	// order and says how to read each; it replaces Features (which must
	// then be nil). A column absent from the header is an error naming it.
	Columns []Column
	// MissingTokens are the cell texts (after trimming spaces) that count
	// as missing in a feature column; nil means "", "?" and "NA". A missing
	// cell reads as NaN in a column whose Column.Missing is set and is an
	// error elsewhere.
	MissingTokens []string
	// Keep names columns whose text is copied to Set.Kept for every row
	// (e.g. an id to join predictions back); they may also be features or
	// the label.
	Keep []string
}

// Column says how ReadCSV reads one feature column.
type Column struct {
	Name string
	// Text keeps the cell text: a category column. X then holds the index
	// of the text in Set.Texts[j].
	Text bool
	// Missing lets a missing token read as NaN instead of an error.
	Missing bool
}

const (
	defaultMaxColumns   = 10_000
	defaultMaxLineBytes = 1 << 20
	maxShown            = 40 // longest cell value quoted in a message
)

// check reports contradictory options. These are the caller's mistakes, not
// the file's, so the error is not a *Error.
func (o *CSVOptions) check() error {
	comma := o.Comma
	if comma == 0 {
		comma = ','
	}
	if comma == '"' || comma == '\r' || comma == '\n' || comma == utf8.RuneError || !utf8.ValidRune(comma) || (o.Multilabel && comma == '|') {
		return describe(ErrOptions, "data: field separator %q cannot be used", comma)
	}
	if o.Features != nil && o.Inputs > 0 && o.Inputs != len(o.Features) {
		return describe(ErrOptions, "data: Inputs is %d but Features names %d columns", o.Inputs, len(o.Features))
	}
	if o.Features != nil && len(o.Features) == 0 {
		return describe(ErrOptions, "data: Features is empty; use nil for every column")
	}
	seen := make(map[string]bool, len(o.Features))
	for _, f := range o.Features {
		if seen[f] {
			return describe(ErrOptions, "data: feature %q named twice in Features", f)
		}
		seen[f] = true
	}
	clear(seen)
	for _, c := range o.Classes {
		switch {
		case c == "" || strings.TrimSpace(c) != c:
			return describe(ErrOptions, "data: class %q is empty or has surrounding spaces", c)
		case o.Multilabel && strings.Contains(c, "|"):
			return describe(ErrOptions, "data: class %q contains '|', the multi-label separator", c)
		case seen[c]:
			return describe(ErrOptions, "data: class %q named twice in Classes", c)
		}
		seen[c] = true
	}
	return nil
}

// ReadCSV reads a header row and data rows from r into a Set. See the
// package documentation for the rules. A problem in the file is returned as
// a *Error naming its line, row and column; the first problem met is
// reported.
func ReadCSV(r io.Reader, opt CSVOptions) (*Set, error) {
	if err := opt.check(); err != nil {
		return nil, err
	}
	maxCols := opt.MaxColumns
	if maxCols <= 0 {
		maxCols = defaultMaxColumns
	}
	maxLine := opt.MaxLineBytes
	if maxLine <= 0 {
		maxLine = defaultMaxLineBytes
	}
	br := bufio.NewReader(r)
	if b, _ := br.Peek(len(bom)); bytes.Equal(b, bom) {
		_, _ = br.Discard(len(bom))
	}
	lim := &limitReader{r: br, max: maxLine, line: 1, recLine: 1}
	cr := csv.NewReader(lim)
	if opt.Comma != 0 {
		cr.Comma = opt.Comma
	}
	cr.FieldsPerRecord = -1 // counted here, to name line and row
	cr.ReuseRecord = true
	rd := &recordReader{cr: cr, lim: lim}

	// Header.
	rec, err := rd.next(0)
	if err == io.EOF {
		return nil, &Error{Line: 1, Err: describe(ErrEmpty, "the file is empty; expected a header row naming the columns")}
	}
	if err != nil {
		return nil, err
	}
	hLine, _ := cr.FieldPos(0)
	if len(rec) > maxCols {
		return nil, &Error{Line: hLine, Err: describe(ErrTooLarge, "header has %d columns, more than the limit of %d (CSVOptions.MaxColumns)", len(rec), maxCols)}
	}
	names := make([]string, len(rec))
	for i, v := range rec {
		names[i] = strings.TrimSpace(v)
	}
	if allNumbers(names) {
		return nil, &Error{Line: hLine, Err: describe(ErrNoHeader, "the first row is all numbers (%s); a header row naming the columns is probably missing", shown(rec[0]))}
	}
	index := make(map[string]int, len(names))
	for i, n := range names {
		if j, ok := index[n]; ok {
			return nil, &Error{Line: hLine, Column: n, Field: i + 1, Err: describe(ErrDuplicateColumn, "name used by fields %d and %d of the header", j+1, i+1)}
		}
		index[n] = i
	}

	labelCol := -1
	switch {
	case opt.Label != "":
		j, ok := index[opt.Label]
		if ok {
			labelCol = j
		} else if !opt.NoLabel {
			return nil, &Error{Line: hLine, Column: opt.Label, Err: describe(ErrMissingColumn, "no label column of that name in the header (%s)", nameList(names))}
		}
	case !opt.NoLabel:
		labelCol = len(names) - 1
	}
	readLabels := !opt.NoLabel
	if labelCol >= 0 && readLabels && !opt.Multilabel && slices.Contains(opt.Classes, names[labelCol]) {
		// A label cell that is a known class beside feature cells that are
		// all numbers: the first row is data, not a header.
		rest := slices.Delete(slices.Clone(names), labelCol, labelCol+1)
		if len(rest) > 0 && allNumbers(rest) {
			return nil, &Error{Line: hLine, Err: describe(ErrNoHeader, "the first row looks like data (numbers and the class %s); a header row naming the columns is probably missing", shown(names[labelCol]))}
		}
	}

	var feat []int
	if opt.Features != nil {
		var missing []string
		for _, f := range opt.Features {
			j, ok := index[f]
			switch {
			case !ok:
				missing = append(missing, f)
			case j == labelCol:
				return nil, &Error{Line: hLine, Column: f, Field: j + 1, Err: describe(ErrOptions, "the label column cannot also be a feature")}
			}
			feat = append(feat, j)
		}
		if len(missing) > 0 {
			return nil, &Error{Line: hLine, Column: missing[0], Err: describe(ErrMissingColumn, "feature columns %s not in the header (%s)", nameList(missing), nameList(names))}
		}
	} else {
		for j := range names {
			if j != labelCol {
				feat = append(feat, j)
			}
		}
		if opt.Inputs > 0 && len(feat) != opt.Inputs {
			return nil, &Error{Line: hLine, Err: describe(ErrFeatureCount, "%d feature columns, expected %d (the spec's inputs)", len(feat), opt.Inputs)}
		}
	}
	if len(feat) == 0 {
		return nil, &Error{Line: hLine, Err: describe(ErrMissingColumn, "no feature columns; expected at least one besides the label")}
	}

	var known map[string]int
	if opt.Classes != nil {
		known = make(map[string]int, len(opt.Classes))
		for i, c := range opt.Classes {
			known[c] = i
		}
	}

	// Data rows.
	nf := len(feat)
	var (
		x      = make([]float64, 0, 64*nf)
		lines  []int
		labels []string   // single-label cells, trimmed
		multi  [][]string // multi-label cells, split and trimmed
		row    int
	)
	for {
		rec, err := rd.next(row + 1)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		row++
		line, _ := cr.FieldPos(0)
		if opt.MaxRows > 0 && row > opt.MaxRows {
			return nil, &Error{Line: line, Row: row, Err: describe(ErrTooLarge, "more than %d rows (CSVOptions.MaxRows)", opt.MaxRows)}
		}
		if len(rec) != len(names) {
			return nil, &Error{Line: line, Row: row, Err: describe(ErrFieldCount, "%d fields, expected %d as in the header", len(rec), len(names))}
		}
		var first *Error // the problem with the lowest field index in this row
		note := func(j int, kind error, format string, args ...any) {
			if first == nil || j+1 < first.Field {
				l, _ := cr.FieldPos(j)
				first = &Error{Line: l, Row: row, Column: names[j], Field: j + 1, Err: describe(kind, format, args...)}
			}
		}
		for _, j := range feat {
			v, kind := parseNumber(rec[j])
			switch kind {
			case nil:
			case ErrEmptyField:
				note(j, kind, "empty field, expected a number")
			case ErrNotFinite:
				note(j, kind, "%s is not a finite number", shown(rec[j]))
			default:
				note(j, kind, "%s is not a number", shown(rec[j]))
			}
			x = append(x, v)
		}
		if readLabels {
			cell := strings.TrimSpace(rec[labelCol])
			if opt.Multilabel {
				var set []string
				if cell != "" {
					set = strings.Split(cell, "|")
					for i := range set {
						set[i] = strings.TrimSpace(set[i])
						c := set[i]
						if c == "" {
							note(labelCol, ErrUnknownClass, "%s has an empty class name between '|'", shown(cell))
							break
						}
						if _, ok := known[c]; known != nil && !ok {
							note(labelCol, ErrUnknownClass, "%s: class %s is not one of %s", shown(cell), shown(c), classList(opt.Classes))
							break
						}
					}
				}
				multi = append(multi, set)
			} else {
				if _, ok := known[cell]; cell == "" {
					note(labelCol, ErrEmptyField, "empty label, expected a class name")
				} else if known != nil && !ok {
					note(labelCol, ErrUnknownClass, "%s is not one of the classes %s", shown(cell), classList(opt.Classes))
				}
				labels = append(labels, cell)
			}
		}
		if first != nil {
			return nil, first
		}
		lines = append(lines, line)
	}
	if row == 0 {
		return nil, &Error{Line: hLine, Err: describe(ErrEmpty, "only a header; expected data rows after it")}
	}

	s := &Set{
		X:          mat.NewDense(row, nf, x),
		Features:   make([]string, nf),
		Multilabel: opt.Multilabel && readLabels,
		Lines:      lines,
	}
	for i, j := range feat {
		s.Features[i] = names[j]
	}
	if !readLabels {
		return s, nil
	}
	classes := opt.Classes
	if classes == nil {
		if opt.Multilabel {
			classes = collect(slices.Concat(multi...))
		} else {
			classes = collect(labels)
		}
	}
	if len(classes) == 0 {
		return nil, &Error{Line: hLine, Column: names[labelCol], Field: labelCol + 1, Err: describe(ErrNoClasses, "every label cell is empty; no class found")}
	}
	s.Classes = slices.Clone(classes)
	if known == nil {
		known = make(map[string]int, len(classes))
		for i, c := range classes {
			known[c] = i
		}
	}
	y := make([]float64, row*len(classes))
	for i := range row {
		yi := y[i*len(classes) : (i+1)*len(classes)]
		if opt.Multilabel {
			for _, c := range multi[i] {
				yi[known[c]] = 1
			}
		} else {
			yi[known[labels[i]]] = 1
		}
	}
	s.Y = mat.NewDense(row, len(classes), y)
	return s, nil
}

var bom = []byte("\uFEFF")

// recordReader turns the errors of csv.Reader and limitReader into *Error,
// reporting whichever comes first in the file.
type recordReader struct {
	cr  *csv.Reader
	lim *limitReader
}

// next returns the next record or io.EOF; row is the data row being read
// (0 for the header).
func (rd *recordReader) next(row int) ([]string, error) {
	rec, err := rd.cr.Read()
	if err == nil || err == io.EOF {
		return rec, err
	}
	var pe *csv.ParseError
	if errors.As(err, &pe) && (rd.lim.err == nil || pe.Line < rd.lim.errLine) {
		where := fmt.Sprintf("byte %d", pe.Column)
		if pe.StartLine != pe.Line {
			// A quote left open runs on to a later line; point at its start too.
			where += fmt.Sprintf(", in a record that starts on line %d", pe.StartLine)
		}
		return nil, &Error{Line: pe.Line, Row: row, Err: describe(ErrQuote, "%s: %v (RFC 4180: a field in quotes ends at a quote, and a quote inside it is doubled)", where, pe.Err)}
	}
	if rd.lim.err != nil {
		e := *rd.lim.err
		e.Row = row
		return nil, &e
	}
	return nil, &Error{Line: rd.lim.line, Row: row, Err: &detail{msg: "reading: " + err.Error(), kind: ErrRead, cause: err}}
}

// limitReader passes bytes through while counting physical lines, and fails
// once a line, or a record spanning lines inside quotes, passes max bytes.
// It hands over the bytes before the offending one, so that earlier lines
// are parsed (and their problems reported) first.
type limitReader struct {
	r       io.Reader
	max     int
	line    int // 1-based line of the next byte
	lineLen int // bytes in the current line so far
	quoted  bool
	recLine int // line where the current record started
	recLen  int
	err     *Error
	errLine int // line at which err was found
}

func (l *limitReader) Read(p []byte) (int, error) {
	if l.err != nil {
		return 0, l.err
	}
	n, err := l.r.Read(p)
	for i, c := range p[:n] {
		switch c {
		case '\n':
			l.line++
			l.lineLen = 0
			if !l.quoted {
				l.recLine, l.recLen = l.line, 0
				continue
			}
		case '"':
			l.quoted = !l.quoted
			l.lineLen++
		default:
			l.lineLen++
		}
		l.recLen++
		switch {
		case l.lineLen > l.max:
			l.err = &Error{Line: l.line, Err: describe(ErrTooLarge, "line longer than %d bytes (CSVOptions.MaxLineBytes)", l.max)}
		case l.recLen > l.max:
			l.err = &Error{Line: l.recLine, Err: describe(ErrTooLarge, "record starting here (quoted across lines) longer than %d bytes (CSVOptions.MaxLineBytes)", l.max)}
		default:
			continue
		}
		l.errLine = l.line
		return i, l.err
	}
	return n, err
}

// parseNumber parses a feature cell, returning nil or the sentinel of the
// problem.
func parseNumber(cell string) (float64, error) {
	t := strings.TrimSpace(cell)
	if t == "" {
		return 0, ErrEmptyField
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return 0, ErrNotFinite // overflow to ±Inf
		}
		return 0, ErrNotNumber
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, ErrNotFinite
	}
	return v, nil
}

// allNumbers reports whether every cell parses as a number.
func allNumbers(cells []string) bool {
	for _, c := range cells {
		if _, err := strconv.ParseFloat(c, 64); err != nil {
			return false
		}
	}
	return true
}

// collect returns the distinct non-empty names, sorted numerically when all
// are integers (ties by text), else by byte order.
func collect(names []string) []string {
	seen := make(map[string]bool)
	var out []string
	for _, n := range names {
		if n != "" && !seen[n] {
			seen[n] = true
			out = append(out, n)
		}
	}
	nums := make(map[string]int64, len(out))
	for _, n := range out {
		v, err := strconv.ParseInt(n, 10, 64)
		if err != nil {
			nums = nil
			break
		}
		nums[n] = v
	}
	slices.SortFunc(out, func(a, b string) int {
		if nums != nil && nums[a] != nums[b] {
			if nums[a] < nums[b] {
				return -1
			}
			return 1
		}
		return strings.Compare(a, b)
	})
	return out
}

// shown quotes a cell for a message, cut to maxShown runes.
func shown(s string) string {
	if utf8.RuneCountInString(s) > maxShown {
		r := []rune(s)
		return strconv.Quote(string(r[:maxShown])) + "…"
	}
	return strconv.Quote(s)
}

// nameList quotes up to ten names, comma-separated.
func nameList(names []string) string {
	const most = 10
	q := make([]string, 0, min(len(names), most)+1)
	for i, n := range names {
		if i == most {
			q = append(q, "…")
			break
		}
		q = append(q, shown(n))
	}
	return strings.Join(q, ", ")
}

func classList(classes []string) string { return "(" + nameList(classes) + ")" }
