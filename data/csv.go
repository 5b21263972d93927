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
			return nil, &Error{Line: hLine, Column: opt.Label, Err: describe(ErrMissingColumn, "no label column of that name in the header (%s)%s", nameList(names), separatorHint(names, opt.Comma))}
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

	// Feature columns: feature k is read from field feat[k] as cols[k] says.
	cols := opt.Columns
	if cols == nil && opt.Features != nil {
		cols = make([]Column, len(opt.Features))
		for k, f := range opt.Features {
			cols[k] = Column{Name: f}
		}
	}
	var feat []int
	if cols != nil {
		var missing []string
		for _, c := range cols {
			j, ok := index[c.Name]
			switch {
			case !ok:
				missing = append(missing, c.Name)
			case j == labelCol:
				return nil, &Error{Line: hLine, Column: c.Name, Field: j + 1, Err: describe(ErrOptions, "the label column cannot also be a feature")}
			}
			feat = append(feat, j)
		}
		if len(missing) > 0 {
			return nil, &Error{Line: hLine, Column: missing[0], Err: describe(ErrMissingColumn, "feature columns %s not in the header (%s)%s", nameList(missing), nameList(names), separatorHint(names, opt.Comma))}
		}
	} else {
		for j := range names {
			if j != labelCol {
				feat = append(feat, j)
				cols = append(cols, Column{Name: names[j]})
			}
		}
		if opt.Inputs > 0 && len(feat) != opt.Inputs {
			return nil, &Error{Line: hLine, Err: describe(ErrFeatureCount, "%d feature columns, expected %d (the spec's inputs)", len(feat), opt.Inputs)}
		}
	}
	if len(feat) == 0 {
		return nil, &Error{Line: hLine, Err: describe(ErrMissingColumn, "no feature columns; expected at least one besides the label%s", separatorHint(names, opt.Comma))}
	}
	keep := make([]int, len(opt.Keep))
	var absent []string
	for i, k := range opt.Keep {
		j, ok := index[k]
		if !ok {
			absent = append(absent, k)
		}
		keep[i] = j
	}
	if len(absent) > 0 {
		return nil, &Error{Line: hLine, Column: absent[0], Err: describe(ErrMissingColumn, "kept columns %s not in the header (%s)", nameList(absent), nameList(names))}
	}

	var known map[string]int
	if opt.Classes != nil {
		known = make(map[string]int, len(opt.Classes))
		for i, c := range opt.Classes {
			known[c] = i
		}
	}

	// role[j] is what field j is: feature k ≥ 0, the label, or ignored.
	const (
		ignored = -1
		label   = -2
	)
	role := make([]int, len(names))
	for j := range role {
		role[j] = ignored
	}
	for k, j := range feat {
		role[j] = k
	}
	if readLabels && labelCol >= 0 {
		role[labelCol] = label
	}
	nf := len(feat)
	var (
		texts   [][]string       // per feature: distinct texts of a Text column, nil for numbers
		textIdx []map[string]int // per feature: index of each text in texts[k]
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
	tokens := opt.MissingTokens
	if tokens == nil {
		tokens = defaultMissingTokens
	}
	isToken := make(map[string]bool, len(tokens))
	tokensFirst := false // a token is itself a number, so tokens are checked before parsing
	for _, t := range tokens {
		isToken[t] = true
		if _, err := parseNumber(t); err == nil {
			tokensFirst = true
		}
	}

	// Problems in cells are collected over the whole file: the first
	// MaxListed in list, and past that a count per field in more.
	var (
		list   []*Error
		more   []int
		failed bool
		row    int
	)
	// note records a problem in field j of the current row.
	note := func(j int, kind, also error, format string, args ...any) {
		failed = true
		if len(list) >= MaxListed {
			if more == nil {
				more = make([]int, len(names))
			}
			more[j]++
			return
		}
		l, _ := cr.FieldPos(j)
		list = append(list, &Error{Line: l, Row: row, Column: names[j], Field: j + 1, Err: &detail{msg: fmt.Sprintf(format, args...), kind: kind, cause: also}})
	}
	// stop ends reading at a problem with the file's structure, returning
	// it after the cell problems found before it.
	stop := func(err error) error {
		var e *Error
		if len(list) == 0 || !errors.As(err, &e) {
			return err
		}
		return newErrorList(append(list, e), more, names)
	}

	// Data rows.
	pool := map[string]string{} // class names, interned
	var (
		x      = make([]float64, 0, 64*nf)
		xr     = make([]float64, nf) // the current row, in feature order
		lines  []int
		labels []string   // single-label cells, trimmed
		multi  [][]string // multi-label cells, split and trimmed
		kept   [][]string
	)
	for {
		rec, err := rd.next(row + 1)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, stop(err)
		}
		row++
		line, _ := cr.FieldPos(0)
		if opt.MaxRows > 0 && row > opt.MaxRows {
			return nil, stop(&Error{Line: line, Row: row, Err: describe(ErrTooLarge, "more than %d rows (CSVOptions.MaxRows)", opt.MaxRows)})
		}
		if len(rec) != len(names) {
			return nil, stop(&Error{Line: line, Row: row, Err: describe(ErrFieldCount, "%d fields, expected %d as in the header", len(rec), len(names))})
		}
		// Fields in file order, so that problems are listed in file order.
		for j, raw := range rec {
			k := role[j]
			if k == ignored {
				continue
			}
			cell := strings.TrimSpace(raw)
			if k == label {
				if opt.Multilabel {
					set := readMulti(cell, known, opt.Classes, func(format string, args ...any) {
						note(j, ErrUnknownClass, nil, format, args...)
					})
					if !failed {
						for i, c := range set {
							set[i] = intern(pool, c)
						}
						multi = append(multi, set)
					}
					continue
				}
				if _, ok := known[cell]; cell == "" {
					note(j, ErrEmptyField, nil, "empty label, expected a class name")
				} else if known != nil && !ok {
					hint := ""
					if strings.Contains(cell, "|") {
						hint = "; multi-label? set `multilabel: true`"
					}
					note(j, ErrUnknownClass, nil, "%s is not one of the classes %s%s", shown(cell), classList(opt.Classes), hint)
				}
				if !failed {
					labels = append(labels, intern(pool, cell))
				}
				continue
			}
			c := cols[k]
			missing := (c.Text || tokensFirst) && isToken[cell]
			v := 0.0
			if !missing && !c.Text {
				var kind error
				v, kind = parseNumber(cell)
				switch {
				case kind == nil:
				case !tokensFirst && isToken[cell]:
					missing = true
				case kind == ErrEmptyField:
					note(j, kind, nil, "empty field, expected a number")
				case kind == ErrNotFinite:
					note(j, kind, nil, "%s is not a finite number", shown(cell))
				default:
					note(j, kind, nil, "%s is not a number; declare `type: category` for a text column", shown(cell))
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
				note(j, ErrMissingValue, also, "missing value %s; the spec's missing rule for this input is refuse: set `missing:` (e.g. %s)", shown(cell), rules)
			case c.Text:
				idx, ok := textIdx[k][cell]
				if !ok {
					idx = len(texts[k])
					cell = strings.Clone(cell) // not the record's backing string
					texts[k] = append(texts[k], cell)
					textIdx[k][cell] = idx
				}
				v = float64(idx)
			}
			xr[k] = v
		}
		if failed {
			continue // nothing more is kept once the file is known to be bad
		}
		x = append(x, xr...)
		if len(keep) > 0 {
			kr := make([]string, len(keep))
			for i, j := range keep {
				kr[i] = strings.Clone(strings.TrimSpace(rec[j]))
			}
			kept = append(kept, kr)
		}
		lines = append(lines, line)
	}
	if row == 0 {
		return nil, &Error{Line: hLine, Err: describe(ErrEmpty, "only a header; expected data rows after it")}
	}
	if failed {
		return nil, newErrorList(list, more, names)
	}

	s := &Set{
		X:          mat.NewDense(row, nf, x),
		Features:   make([]string, nf),
		Multilabel: opt.Multilabel && readLabels,
		Lines:      lines,
		Texts:      texts,
	}
	if opt.Keep != nil {
		s.Kept = kept
	}
	for i, j := range feat {
		s.Features[i] = names[j]
	}
	if !readLabels {
		return s, nil
	}
	s.Label = names[labelCol]
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
