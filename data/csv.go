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
	// from the header is an error naming it. nil (with Columns nil) takes
	// every column but the label, in file order.
	Features []string
	// Inputs, when > 0 and Features and Columns are nil, is the number of
	// feature columns the file must have. When Features or Columns is set it
	// must equal its length.
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
	// RowsHint, when > 0, is the number of data rows expected (a guess
	// will do, such as one from the file's size): room for that many rows
	// (at most MaxRows, when set) is set aside before the first is read,
	// so that the rows are not grown and copied as they come, which holds
	// up to a quarter more memory than they need and leaves the copies to
	// the collector. Any number of rows is still read.
	RowsHint int
	// Columns, when non-nil, picks the feature columns by name in this
	// order and says how to read each; it replaces Features (which must
	// then be nil; setting both is ErrOptions). Names must be distinct, and
	// when Inputs > 0 it must equal len(Columns). A column absent from the
	// header is an error naming it; columns not named are ignored.
	Columns []Column
	// MissingTokens are the cell texts (after trimming spaces) that count
	// as missing in a feature column; nil means "", "?" and "NA" (an empty
	// slice means none). A missing cell reads as NaN in a column whose
	// Column.Missing is set and is an error wrapping ErrMissingValue
	// elsewhere, including every column read by Features or by default.
	// Label cells are never missing: a token there is read as a class name.
	// A token may not have surrounding spaces.
	MissingTokens []string
	// Keep names columns whose text (trimmed) is copied to Set.Kept for
	// every row (e.g. an id to join predictions back), in this order; they
	// may also be features or the label. A name absent from the header is
	// an error naming it (ErrMissingColumn); a name listed twice is
	// ErrOptions.
	Keep []string
}

// Column says how ReadCSV reads one feature column.
type Column struct {
	// Name is the column's name in the header.
	Name string
	// Text keeps the cell text: a category column. X then holds the index
	// of the trimmed text in Set.Texts[j]. false reads a number.
	Text bool
	// Missing lets a missing token (CSVOptions.MissingTokens) read as NaN
	// instead of an error.
	Missing bool
}

const (
	defaultMaxColumns   = 10_000
	defaultMaxLineBytes = 1 << 20
	maxShown            = 40 // longest cell value quoted in a message
)

// defaultMissingTokens are the missing tokens when CSVOptions.MissingTokens
// is nil.
var defaultMissingTokens = []string{"", "?", "NA"}

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
	if o.Columns != nil {
		switch {
		case o.Features != nil:
			return describe(ErrOptions, "data: Columns and Features both set; use one")
		case len(o.Columns) == 0:
			return describe(ErrOptions, "data: Columns is empty; use nil for every column")
		case o.Inputs > 0 && o.Inputs != len(o.Columns):
			return describe(ErrOptions, "data: Inputs is %d but Columns names %d columns", o.Inputs, len(o.Columns))
		}
		clear(seen)
		for _, c := range o.Columns {
			if seen[c.Name] {
				return describe(ErrOptions, "data: column %q named twice in Columns", c.Name)
			}
			seen[c.Name] = true
		}
	}
	for _, t := range o.MissingTokens {
		if strings.TrimSpace(t) != t {
			return describe(ErrOptions, "data: missing token %q has surrounding spaces, which are trimmed from every cell", t)
		}
	}
	clear(seen)
	for _, k := range o.Keep {
		if seen[k] {
			return describe(ErrOptions, "data: column %q named twice in Keep", k)
		}
		seen[k] = true
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
// package documentation for the rules.
//
// Problems in cells (a non-number, a non-finite number, a missing value
// where the column refuses one, an unknown class, an empty label) are
// collected over the whole file and returned together as an *ErrorList,
// even when there is only one. A problem with the file's structure (the
// header, a row's field count, quoting, line ends, a size limit) stops
// reading at once: it is returned as a lone *Error when no cell problem came
// before it, else as the last entry of an *ErrorList after them. Either way
// errors.As(err, &e) with e a *Error finds the first problem in the file,
// and errors.Is matches the sentinel of any listed problem. Contradictory
// options are an error wrapping ErrOptions that is not a *Error.
func ReadCSV(r io.Reader, opt CSVOptions) (*Set, error) {
	if err := opt.check(); err != nil {
		return nil, err
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

	l, err := readLayout(rd, &opt)
	if err != nil {
		return nil, err
	}
	return readRows(rd, &l, &opt)
}

// csvLayout is what a file's header and the options say about the fields
// of every record.
type csvLayout struct {
	names    []string // field names from the header, trimmed
	line     int      // the header's line
	labelCol int      // field of the label column, or -1 for none
	role     []int    // what each field is: feature k ≥ 0, roleLabel or roleIgnored
	nf       int      // number of features
}

// What a field is, in csvLayout.role, when it is not a feature. A label
// column that is not read (CSVOptions.NoLabel) is ignored.
const (
	roleIgnored = -1
	roleLabel   = -2
)

// readLayout reads the header from rd and resolves which field plays which
// role, as opt asks.
func readLayout(rd *recordReader, opt *CSVOptions) (csvLayout, error) {
	names, line, err := readHeader(rd, opt.MaxColumns)
	if err != nil {
		return csvLayout{}, err
	}
	l := csvLayout{names: names, line: line}
	index := make(map[string]int, len(names)) // the field of each name
	for i, n := range names {
		if j, ok := index[n]; ok {
			return csvLayout{}, &Error{Line: line, Column: n, Field: i + 1, Err: describe(ErrDuplicateColumn, "name used by fields %d and %d of the header", j+1, i+1)}
		}
		index[n] = i
	}
	if l.labelCol, err = l.findLabel(index, opt); err != nil {
		return csvLayout{}, err
	}
	if l.role, l.nf, err = l.findFeatures(index, opt); err != nil {
		return csvLayout{}, err
	}
	if !opt.NoLabel && l.labelCol >= 0 {
		l.role[l.labelCol] = roleLabel
	}
	return l, nil
}

// readHeader reads the header row and returns its names, trimmed, and its
// line. It rejects a header past the column limit (before any per-column
// storage is made) and one that is all numbers.
func readHeader(rd *recordReader, maxCols int) ([]string, int, error) {
	if maxCols <= 0 {
		maxCols = defaultMaxColumns
	}
	rec, err := rd.next(0)
	if err == io.EOF {
		return nil, 0, &Error{Line: 1, Err: describe(ErrEmpty, "the file is empty; expected a header row naming the columns")}
	}
	if err != nil {
		return nil, 0, err
	}
	line, _ := rd.cr.FieldPos(0)
	if len(rec) > maxCols {
		return nil, 0, &Error{Line: line, Err: describe(ErrTooLarge, "header has %d columns, more than the limit of %d (CSVOptions.MaxColumns)", len(rec), maxCols)}
	}
	names := make([]string, len(rec))
	for i, v := range rec {
		names[i] = strings.TrimSpace(v)
	}
	if allNumbers(names) {
		return nil, 0, &Error{Line: line, Err: describe(ErrNoHeader, "the first row is all numbers (%s); a header row naming the columns is probably missing", shown(rec[0]))}
	}
	return names, line, nil
}

// findLabel returns the label column's field (-1 for none), given the
// field of each name. It rejects a first row that looks like data: a known
// class beside numbers.
func (l *csvLayout) findLabel(index map[string]int, opt *CSVOptions) (int, error) {
	labelCol := -1
	switch {
	case opt.Label != "":
		j, ok := index[opt.Label]
		if ok {
			labelCol = j
		} else if !opt.NoLabel {
			return 0, &Error{Line: l.line, Column: opt.Label, Err: describe(ErrMissingColumn, "no label column of that name in the header (%s)%s", nameList(l.names), separatorHint(l.names, opt.Comma))}
		}
	case !opt.NoLabel:
		labelCol = len(l.names) - 1
	}
	if labelCol >= 0 && !opt.NoLabel && !opt.Multilabel && slices.Contains(opt.Classes, l.names[labelCol]) {
		// A label cell that is a known class beside feature cells that are
		// all numbers: the first row is data, not a header.
		rest := slices.Delete(slices.Clone(l.names), labelCol, labelCol+1)
		if len(rest) > 0 && allNumbers(rest) {
			return 0, &Error{Line: l.line, Err: describe(ErrNoHeader, "the first row looks like data (numbers and the class %s); a header row naming the columns is probably missing", shown(l.names[labelCol]))}
		}
	}
	return labelCol, nil
}

// findFeatures picks the feature columns, given the field of each name and
// l.labelCol: opt.Columns or opt.Features in their order, else every field
// but the label in file order. It returns each field's role (features and
// ignored fields only) and the number of features.
func (l *csvLayout) findFeatures(index map[string]int, opt *CSVOptions) ([]int, int, error) {
	names := l.names
	cols := opt.Columns
	if cols == nil && opt.Features != nil {
		cols = make([]Column, len(opt.Features))
		for k, f := range opt.Features {
			cols[k] = Column{Name: f}
		}
	}
	var feat []int // feature k is field feat[k]
	if cols != nil {
		var missing []string
		for _, c := range cols {
			j, ok := index[c.Name]
			switch {
			case !ok:
				missing = append(missing, c.Name)
			case j == l.labelCol:
				return nil, 0, &Error{Line: l.line, Column: c.Name, Field: j + 1, Err: describe(ErrOptions, "the label column cannot also be a feature")}
			}
			feat = append(feat, j)
		}
		if len(missing) > 0 {
			return nil, 0, &Error{Line: l.line, Column: missing[0], Err: describe(ErrMissingColumn, "feature columns %s not in the header (%s)%s", nameList(missing), nameList(names), separatorHint(names, opt.Comma))}
		}
	} else {
		for j := range names {
			if j != l.labelCol {
				feat = append(feat, j)
				cols = append(cols, Column{Name: names[j]})
			}
		}
		if opt.Inputs > 0 && len(feat) != opt.Inputs {
			return nil, 0, &Error{Line: l.line, Err: describe(ErrFeatureCount, "%d feature columns, expected %d (the spec's inputs)", len(feat), opt.Inputs)}
		}
	}
	if len(feat) == 0 {
		return nil, 0, &Error{Line: l.line, Err: describe(ErrMissingColumn, "no feature columns; expected at least one besides the label%s", separatorHint(names, opt.Comma))}
	}
	role := make([]int, len(names))
	for j := range role {
		role[j] = roleIgnored
	}
	for k, j := range feat {
		role[j] = k
	}
	return role, len(feat), nil
}

// findKept sets fields[i] to the field of the column named keep[i].
func (l *csvLayout) findKept(fields []int, keep []string) error {
	var absent []string
	for i, k := range keep {
		fields[i] = slices.Index(l.names, k)
		if fields[i] < 0 {
			absent = append(absent, k)
		}
	}
	if len(absent) > 0 {
		return &Error{Line: l.line, Column: absent[0], Err: describe(ErrMissingColumn, "kept columns %s not in the header (%s)", nameList(absent), nameList(l.names))}
	}
	return nil
}

// rowReader holds what reading the data rows shares. It stays on
// readRows' stack, and so can the small slices and maps it points to, made
// there, as long as none of them ends up in the Set or the error list:
// what does is one pointer away, in cellsRead, or a local variable of read.
type rowReader struct {
	*csvLayout
	cr   *csv.Reader // for the line of a field
	opt  *CSVOptions
	keep []int // field of each CSVOptions.Keep column

	known       map[string]int    // class index by name; nil when the classes are collected from the file
	isToken     map[string]bool   // the missing tokens
	tokensFirst bool              // a token is itself a number, so tokens are checked before parsing
	pool        map[string]string // class names, interned
	row         int               // data rows read so far
	failed      bool              // a problem was found in a cell
	found       *cellsRead        // the texts of Text columns and the problems
}

// cellsRead is what reading the cells of the data rows collects besides
// the rows' values and labels.
type cellsRead struct {
	texts   [][]string       // per feature: distinct texts of a Text column, nil for numbers
	textIdx []map[string]int // per feature: index of each text in texts[k]

	// Problems in cells are collected over the whole file: the first
	// MaxListed in list, and past that a count per field in more.
	list []*Error
	more []int
}

// readRows finds the kept columns among the fields laid out as l says, then
// reads the data rows after the header and returns them as a Set.
func readRows(rd *recordReader, l *csvLayout, opt *CSVOptions) (*Set, error) {
	keep := make([]int, len(opt.Keep))
	if err := l.findKept(keep, opt.Keep); err != nil {
		return nil, err
	}
	tokens := opt.MissingTokens
	if tokens == nil {
		tokens = defaultMissingTokens
	}
	var found cellsRead
	found.texts, found.textIdx = textColumns(opt.Columns, l.nf)
	rr := rowReader{
		csvLayout: l,
		cr:        rd.cr,
		opt:       opt,
		keep:      keep,
		known:     classIndex(opt.Classes),
		isToken:   make(map[string]bool, len(tokens)),
		pool:      map[string]string{},
		found:     &found,
	}
	rr.tokensFirst = addTokens(rr.isToken, tokens)
	return rr.read(rd)
}

// read reads the data rows to the end of the file and returns them as a
// Set. A problem with the file's structure stops reading at once; problems
// in cells are collected and returned together at the end.
func (rr *rowReader) read(rd *recordReader) (*Set, error) {
	// What is kept of the rows is appended to local variables, which the
	// compiler can start on the stack (kept is put in the Set below, not in
	// newSet, for that reason).
	hint := max(rr.opt.RowsHint, 0)
	if rr.opt.MaxRows > 0 {
		hint = min(hint, rr.opt.MaxRows)
	}
	var (
		x      = make([]float64, 0, max(64, hint)*rr.nf) // the feature values, row after row
		xr     = make([]float64, rr.nf)                  // the current row, in feature order
		lines  []int                                     // the line of each row
		kept   [][]string                                // the texts of the kept columns, per row
		labels []string                                  // single-label cells, trimmed, one per row
		multi  [][]string                                // multi-label cells, split and trimmed, one per row
	)
	if hint > 0 {
		lines = make([]int, 0, hint)
		if !rr.opt.NoLabel && !rr.opt.Multilabel {
			labels = make([]string, 0, hint)
		}
	}
	for {
		rec, line, err := rr.nextRow(rd)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, rr.stop(err)
		}
		// Fields in file order, so that problems are listed in file order.
		for j, raw := range rec {
			k := rr.role[j]
			if k == roleIgnored {
				continue
			}
			cell := strings.TrimSpace(raw)
			switch {
			case k >= 0:
				xr[k] = rr.feature(j, k, cell)
			case rr.opt.Multilabel:
				if set, ok := rr.labelSet(j, cell); ok {
					multi = append(multi, set)
				}
			default:
				if label, ok := rr.label(j, cell); ok {
					labels = append(labels, label)
				}
			}
		}
		if rr.failed {
			continue // nothing more is kept once the file is known to be bad
		}
		x = append(x, xr...)
		if len(rr.keep) > 0 {
			kept = append(kept, keptRow(rec, rr.keep))
		}
		lines = append(lines, line)
	}
	if rr.row == 0 {
		return nil, &Error{Line: rr.line, Err: describe(ErrEmpty, "only a header; expected data rows after it")}
	}
	if rr.failed {
		return nil, newErrorList(rr.found.list, rr.found.more, rr.names)
	}
	s := rr.newSet(x, lines)
	if rr.opt.Keep != nil {
		s.Kept = kept
	}
	if !rr.opt.NoLabel {
		if err := rr.setLabels(s, labels, multi); err != nil {
			return nil, err
		}
	}
	return s, nil
}

// nextRow reads the next data row and returns its record and line, or
// io.EOF after the last row. Any other error is a problem with the file's
// structure, among them a row past CSVOptions.MaxRows and a field count
// unlike the header's.
func (rr *rowReader) nextRow(rd *recordReader) ([]string, int, error) {
	rec, err := rd.next(rr.row + 1)
	if err != nil {
		return nil, 0, err
	}
	rr.row++
	line, _ := rr.cr.FieldPos(0)
	if rr.opt.MaxRows > 0 && rr.row > rr.opt.MaxRows {
		return nil, 0, &Error{Line: line, Row: rr.row, Err: describe(ErrTooLarge, "more than %d rows (CSVOptions.MaxRows)", rr.opt.MaxRows)}
	}
	if len(rec) != len(rr.names) {
		return nil, 0, &Error{Line: line, Row: rr.row, Err: describe(ErrFieldCount, "%d fields, expected %d as in the header", len(rec), len(rr.names))}
	}
	return rec, line, nil
}

// addTokens adds the missing tokens to set and reports whether one of them
// is itself a number.
func addTokens(set map[string]bool, tokens []string) bool {
	number := false
	for _, t := range tokens {
		set[t] = true
		if _, err := parseNumber(t); err == nil {
			number = true
		}
	}
	return number
}

// classIndex returns the index of each class, or nil for nil classes. It
// is small enough to be inlined, so that a small map can stay on the
// caller's stack.
func classIndex(classes []string) map[string]int {
	if classes == nil {
		return nil
	}
	m := make(map[string]int, len(classes))
	for i, c := range classes {
		m[c] = i
	}
	return m
}

// textColumns returns, per feature, an empty list of texts and an empty
// index of texts for each Text column in cols and nil for the others; or
// nil, nil when no column is a Text column.
func textColumns(cols []Column, nf int) ([][]string, []map[string]int) {
	var (
		texts   [][]string
		textIdx []map[string]int
	)
	for k, c := range cols {
		if c.Text {
			if texts == nil {
				texts = make([][]string, nf)
				textIdx = make([]map[string]int, nf)
			}
			texts[k] = []string{}
			textIdx[k] = make(map[string]int)
		}
	}
	return texts, textIdx
}

// keptRow returns the trimmed texts of the given fields of rec, copied off
// the record.
func keptRow(rec []string, fields []int) []string {
	kr := make([]string, len(fields))
	for i, j := range fields {
		kr[i] = strings.Clone(strings.TrimSpace(rec[j]))
	}
	return kr
}

// feature returns the value of the cell of feature k, in field j: a number,
// the index of a text in a Text column, or NaN for a missing cell where
// the column allows one. A problem is noted and its value is not used.
func (rr *rowReader) feature(j, k int, cell string) float64 {
	var c Column // a number column refusing missing cells, unless opt.Columns says otherwise
	if rr.opt.Columns != nil {
		c = rr.opt.Columns[k]
	}
	missing := (c.Text || rr.tokensFirst) && rr.isToken[cell]
	v := 0.0
	if !missing && !c.Text {
		var kind error
		v, kind = parseNumber(cell)
		switch {
		case kind == nil:
		case !rr.tokensFirst && rr.isToken[cell]:
			missing = true
		case kind == ErrEmptyField:
			rr.note(j, kind, nil, "empty field, expected a number")
		case kind == ErrNotFinite:
			rr.note(j, kind, nil, "%s is not a finite number", shown(cell))
		default:
			rr.note(j, kind, nil, "%s is not a number; declare `type: category` for a text column", shown(cell))
		}
	}
	switch {
	case missing && c.Missing:
		v = math.NaN()
	case missing:
		var also error
		if cell == "" {
			also = ErrEmptyField
		}
		rules := "mean, median, mode"
		if c.Text {
			rules = "level, mode"
		}
		rr.note(j, ErrMissingValue, also, "missing value %s; the spec's missing rule for this input is refuse: set `missing:` (e.g. %s)", shown(cell), rules)
	case c.Text:
		texts, index := rr.found.texts, rr.found.textIdx[k]
		idx, ok := index[cell]
		if !ok {
			idx = len(texts[k])
			cell = strings.Clone(cell) // not the record's backing string
			texts[k] = append(texts[k], cell)
			index[cell] = idx
		}
		v = float64(idx)
	}
	return v
}

// label reads the single-label cell in field j. It returns the class name,
// interned, and true; or false once a cell of the file is bad, when labels
// are no longer kept.
func (rr *rowReader) label(j int, cell string) (string, bool) {
	if _, ok := rr.known[cell]; cell == "" {
		rr.note(j, ErrEmptyField, nil, "empty label, expected a class name")
	} else if rr.known != nil && !ok {
		hint := ""
		if strings.Contains(cell, "|") {
			hint = "; multi-label? set `multilabel: true`"
		}
		rr.note(j, ErrUnknownClass, nil, "%s is not one of the classes %s%s", shown(cell), classList(rr.opt.Classes), hint)
	}
	if rr.failed {
		return "", false
	}
	return intern(rr.pool, cell), true
}

// labelSet reads the multi-label cell in field j. It returns the class
// names, interned, and true; or false once a cell of the file is bad, when
// labels are no longer kept.
func (rr *rowReader) labelSet(j int, cell string) ([]string, bool) {
	set := readMulti(cell, rr.known, rr.opt.Classes, func(format string, args ...any) {
		rr.note(j, ErrUnknownClass, nil, format, args...)
	})
	if rr.failed {
		return nil, false
	}
	for i, c := range set {
		set[i] = intern(rr.pool, c)
	}
	return set, true
}

// note records a problem in field j of the current row.
func (rr *rowReader) note(j int, kind, also error, format string, args ...any) {
	rr.failed = true
	found := rr.found
	if len(found.list) >= MaxListed {
		if found.more == nil {
			found.more = make([]int, len(rr.names))
		}
		found.more[j]++
		return
	}
	l, _ := rr.cr.FieldPos(j)
	found.list = append(found.list, &Error{Line: l, Row: rr.row, Column: rr.names[j], Field: j + 1, Err: &detail{msg: fmt.Sprintf(format, args...), kind: kind, cause: also}})
}

// stop ends reading at a problem with the file's structure, returning it
// after the problems in cells found before it.
func (rr *rowReader) stop(err error) error {
	var e *Error
	if len(rr.found.list) == 0 || !errors.As(err, &e) {
		return err
	}
	return newErrorList(append(rr.found.list, e), rr.found.more, rr.names)
}

// newSet returns a Set of the rows read, given their values x and lines,
// without kept texts or labels.
func (rr *rowReader) newSet(x []float64, lines []int) *Set {
	opt := rr.opt
	s := &Set{
		X:          mat.NewDense(rr.row, rr.nf, x),
		Features:   make([]string, rr.nf),
		Multilabel: opt.Multilabel && !opt.NoLabel,
		Lines:      lines,
		Texts:      rr.found.texts,
	}
	for j, k := range rr.role {
		if k >= 0 {
			s.Features[k] = rr.names[j]
		}
	}
	return s
}

// setLabels sets the label column's name, the classes and Y of s from the
// labels of the rows: labels for a single-label file, else multi.
func (rr *rowReader) setLabels(s *Set, labels []string, multi [][]string) error {
	opt := rr.opt
	s.Label = rr.names[rr.labelCol]
	classes := opt.Classes
	if classes == nil {
		if opt.Multilabel {
			classes = collect(slices.Concat(multi...))
		} else {
			classes = collect(labels)
		}
	}
	if len(classes) == 0 {
		return &Error{Line: rr.line, Column: s.Label, Field: rr.labelCol + 1, Err: describe(ErrNoClasses, "every label cell is empty; no class found")}
	}
	s.Classes = slices.Clone(classes)
	known := rr.known
	if known == nil {
		known = classIndex(classes)
	}
	y := make([]float64, rr.row*len(classes))
	for i := range rr.row {
		yi := y[i*len(classes) : (i+1)*len(classes)]
		if opt.Multilabel {
			for _, c := range multi[i] {
				yi[known[c]] = 1
			}
		} else {
			yi[known[labels[i]]] = 1
		}
	}
	s.Y = mat.NewDense(rr.row, len(classes), y)
	return nil
}

// readMulti splits a multi-label cell at '|' into trimmed class names,
// calling bad for the first problem (an empty name, or a name not in known
// when known is not nil). An empty cell is a row with no class.
func readMulti(cell string, known map[string]int, classes []string, bad func(format string, args ...any)) []string {
	if cell == "" {
		return nil
	}
	set := strings.Split(cell, "|")
	for i := range set {
		set[i] = strings.TrimSpace(set[i])
		c := set[i]
		if c == "" {
			bad("%s has an empty class name between '|'", shown(cell))
			break
		}
		if _, ok := known[c]; known != nil && !ok {
			bad("%s: class %s is not one of %s", shown(cell), shown(c), classList(classes))
			break
		}
	}
	return set
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
	cr      bool // the last byte was a carriage return outside quotes
	lf      bool // a line feed has been seen
	err     *Error
	errLine int // line at which err was found
}

func (l *limitReader) Read(p []byte) (int, error) {
	if l.err != nil {
		return 0, l.err
	}
	n, err := l.r.Read(p)
	for i, c := range p[:n] {
		if l.cr && c != '\n' {
			// encoding/csv ends lines at LF (a CR before it is dropped),
			// so a lone CR would join lines into one and make a nonsense
			// header or cell: say what it is instead.
			if l.lf {
				l.err = &Error{Line: l.line, Err: describe(ErrLineEnds, "a carriage return (CR) not followed by a line feed (LF) outside quotes; lines must end in LF or CRLF")}
			} else {
				l.err = &Error{Line: l.line, Err: describe(ErrLineEnds, "lines end in a carriage return (CR) alone, as old Mac files do; save the file with LF or CRLF line ends")}
			}
			l.errLine = l.line
			return i, l.err
		}
		l.cr = c == '\r' && !l.quoted
		switch c {
		case '\n':
			l.lf = true
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

// parseNumber parses a feature cell, already trimmed of spaces, returning
// nil or the sentinel of the problem.
func parseNumber(cell string) (float64, error) {
	if cell == "" {
		return 0, ErrEmptyField
	}
	v, err := strconv.ParseFloat(cell, 64)
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

// separatorHint names the separator a header seems to use when it was read
// as one column that holds ';', a tab or another common separator: the
// usual cause of "column not in the header" on a file from a spreadsheet
// set to another locale. It returns "" otherwise.
func separatorHint(names []string, comma rune) string {
	if len(names) != 1 {
		return ""
	}
	for _, c := range []struct {
		r    rune
		name string
	}{{';', "';'"}, {'\t', "a tab"}, {'|', "'|'"}, {',', "','"}} {
		if c.r != comma && strings.ContainsRune(names[0], c.r) {
			return fmt.Sprintf("; the header is one column holding %s: is the file separated by %s? (CSVOptions.Comma; seine: -comma %s)", c.name, c.name, map[rune]string{';': "';'", '\t': "tab", '|': "'|'", ',': "','"}[c.r])
		}
	}
	return ""
}

// intern returns a copy of a class name that does not hold on to the line
// it was read from (a cell is a slice of the whole record's text), shared
// by every row with that name: the label column of a million rows costs
// its distinct names, not a million lines.
func intern(pool map[string]string, name string) string {
	if v, ok := pool[name]; ok {
		return v
	}
	v := strings.Clone(name)
	pool[v] = v
	return v
}
