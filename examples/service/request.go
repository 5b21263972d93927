package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"net/http"
	"strconv"
	"strings"

	"github.com/seine-ml/seine/encode"
)

// maxRows is the most rows one request may carry.
const maxRows = 1000

// fieldError is a bad request, with the path of the offending field in
// the request body: "body", "features", "features.req_per_min", "rows",
// "rows[2]" or "rows[2][5]".
type fieldError struct {
	field string
	msg   string
	err   error // the underlying read or syntax error, if any
}

func (e *fieldError) Error() string { return e.field + ": " + e.msg }

// parseRequest reads a classify request,
//
//	{"features": {"<name>": <value>, ...}}   every input of the model, by name
//	{"rows": [[<value>, ...], ...]}          1 … maxRows rows of inputs values each, in model order
//
// where a value is a number, a string (a category's level, e.g. "browser")
// or null (a missing value, filled by the input's rule or refused). It
// returns the rows of raw values in model order; single reports the
// "features" form. JSON has no NaN or Infinity, and a number beyond the
// float64 range is refused. The body is read token by token, so that even
// a syntax error (say a bare NaN) is reported at the field where it occurs.
// Whether each value suits its input is the model's to say (see classify).
func parseRequest(r io.Reader, features []string) (rows [][]encode.Value, single bool, ferr *fieldError) {
	inputs := len(features)
	seen := new(bytes.Buffer) // the bytes read so far (at most maxBody), to name a bad character
	p := parser{dec: json.NewDecoder(io.TeeReader(r, seen)), seen: seen}
	p.dec.UseNumber()
	if ferr := p.open('{', "body", "a JSON object"); ferr != nil {
		return nil, false, ferr
	}
	var gotFeatures, gotRows bool
	for p.dec.More() {
		key, ferr := p.key("body")
		if ferr != nil {
			return nil, false, ferr
		}
		switch key {
		case "features":
			if gotFeatures {
				return nil, false, &fieldError{field: key, msg: "given twice"}
			}
			gotFeatures = true
			row, ferr := p.features(features)
			if ferr != nil {
				return nil, false, ferr
			}
			rows, single = [][]encode.Value{row}, true
		case "rows":
			if gotRows {
				return nil, false, &fieldError{field: key, msg: "given twice"}
			}
			gotRows = true
			if rows, ferr = p.rows(inputs); ferr != nil {
				return nil, false, ferr
			}
		default:
			return nil, false, &fieldError{field: key, msg: `unknown field; want "features" or "rows"`}
		}
	}
	if ferr := p.close("body"); ferr != nil {
		return nil, false, ferr
	}
	if _, err := p.dec.Token(); err != io.EOF {
		return nil, false, &fieldError{field: "body", msg: "more data after the JSON object"}
	}
	switch {
	case gotFeatures && gotRows:
		return nil, false, &fieldError{field: "body", msg: `give "features" or "rows", not both`}
	case !gotFeatures && !gotRows:
		return nil, false, &fieldError{field: "body", msg: `want "features" or "rows"`}
	}
	return rows, single, nil
}

// parser reads the request's tokens.
type parser struct {
	dec  *json.Decoder
	seen *bytes.Buffer
}

// fail turns a read error at field into a fieldError.
func (p *parser) fail(field string, err error) *fieldError {
	var tooBig *http.MaxBytesError
	var syn *json.SyntaxError
	switch {
	case errors.As(err, &tooBig):
		return &fieldError{field: "body", msg: fmt.Sprintf("larger than %d bytes", tooBig.Limit), err: err}
	case errors.As(err, &syn):
		msg := fmt.Sprintf("invalid JSON at byte %d: %v", syn.Offset, err)
		if b := p.seen.Bytes(); syn.Offset >= 1 && syn.Offset <= int64(len(b)) {
			if c := b[syn.Offset-1]; c == 'N' || c == 'I' {
				msg += " (NaN and Infinity are not JSON numbers)"
			}
		}
		return &fieldError{field: field, msg: msg, err: err}
	case err == io.EOF, errors.Is(err, io.ErrUnexpectedEOF):
		return &fieldError{field: field, msg: "body ended early", err: err}
	}
	return &fieldError{field: field, msg: err.Error(), err: err}
}

// open reads the delimiter d ('{' or '['); want describes it for errors.
func (p *parser) open(d json.Delim, field, want string) *fieldError {
	tok, err := p.dec.Token()
	if err != nil {
		return p.fail(field, err)
	}
	if got, ok := tok.(json.Delim); !ok || got != d {
		return &fieldError{field: field, msg: "want " + want + ", got " + describe(tok)}
	}
	return nil
}

// close reads the delimiter that ends the object or array just read.
func (p *parser) close(field string) *fieldError {
	if _, err := p.dec.Token(); err != nil {
		return p.fail(field, err)
	}
	return nil
}

// key reads an object key.
func (p *parser) key(field string) (string, *fieldError) {
	tok, err := p.dec.Token()
	if err != nil {
		return "", p.fail(field, err)
	}
	key, ok := tok.(string)
	if !ok { // the decoder reports a non-string key as a syntax error; be safe
		return "", &fieldError{field: field, msg: "want a key, got " + describe(tok)}
	}
	return key, nil
}

// value reads one raw value: a finite number, a string, or null.
func (p *parser) value(field string) (encode.Value, *fieldError) {
	tok, err := p.dec.Token()
	if err != nil {
		return encode.Missing, p.fail(field, err)
	}
	switch t := tok.(type) {
	case nil:
		return encode.Missing, nil
	case string:
		return encode.Text(t), nil
	case json.Number:
		v, err := strconv.ParseFloat(string(t), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return encode.Missing, &fieldError{field: field, msg: fmt.Sprintf("%s is not a finite number", t)}
		}
		return encode.Number(v), nil
	}
	return encode.Missing, &fieldError{field: field, msg: "want a number, a string or null, got " + describe(tok)}
}

// features reads {"<name>": <value>, ...} holding every input once.
func (p *parser) features(names []string) ([]encode.Value, *fieldError) {
	if ferr := p.open('{', "features", "an object of input values by name"); ferr != nil {
		return nil, ferr
	}
	col := make(map[string]int, len(names))
	for j, name := range names {
		col[name] = j
	}
	row := make([]encode.Value, len(names))
	seen := make([]bool, len(names))
	for p.dec.More() {
		name, ferr := p.key("features")
		if ferr != nil {
			return nil, ferr
		}
		field := "features." + name
		j, ok := col[name]
		if !ok {
			return nil, &fieldError{field: field, msg: "unknown input; want one of " + strings.Join(names, ", ")}
		}
		if seen[j] {
			return nil, &fieldError{field: field, msg: "given twice"}
		}
		seen[j] = true
		if row[j], ferr = p.value(field); ferr != nil {
			return nil, ferr
		}
	}
	if ferr := p.close("features"); ferr != nil {
		return nil, ferr
	}
	var missing []string
	for j, ok := range seen {
		if !ok {
			missing = append(missing, names[j])
		}
	}
	if len(missing) > 0 {
		return nil, &fieldError{field: "features." + missing[0], msg: "absent (all absent: " + strings.Join(missing, ", ") + "); send null for a missing value"}
	}
	return row, nil
}

// rows reads [[<value>, ...], ...], each row of exactly inputs values.
func (p *parser) rows(inputs int) ([][]encode.Value, *fieldError) {
	if ferr := p.open('[', "rows", "an array of rows"); ferr != nil {
		return nil, ferr
	}
	var rows [][]encode.Value
	for p.dec.More() {
		i := len(rows)
		if i == maxRows {
			return nil, &fieldError{field: "rows", msg: fmt.Sprintf("more than %d rows", maxRows)}
		}
		field := fmt.Sprintf("rows[%d]", i)
		if ferr := p.open('[', field, "an array of values"); ferr != nil {
			return nil, ferr
		}
		row := make([]encode.Value, 0, inputs)
		for p.dec.More() {
			if len(row) == inputs {
				return nil, &fieldError{field: field, msg: fmt.Sprintf("more than %d values", inputs)}
			}
			v, ferr := p.value(fmt.Sprintf("%s[%d]", field, len(row)))
			if ferr != nil {
				return nil, ferr
			}
			row = append(row, v)
		}
		if ferr := p.close(field); ferr != nil {
			return nil, ferr
		}
		if len(row) != inputs {
			return nil, &fieldError{field: field, msg: fmt.Sprintf("has %d values, want %d", len(row), inputs)}
		}
		rows = append(rows, row)
	}
	if ferr := p.close("rows"); ferr != nil {
		return nil, ferr
	}
	if len(rows) == 0 {
		return nil, &fieldError{field: "rows", msg: "no rows"}
	}
	return rows, nil
}

// describe names the kind of a JSON token for messages.
func describe(tok json.Token) string {
	switch t := tok.(type) {
	case json.Delim:
		switch t {
		case '{':
			return "an object"
		case '[':
			return "an array"
		}
		return fmt.Sprintf("%q", string(t))
	case string:
		return fmt.Sprintf("the string %q", t)
	case bool:
		return "a boolean"
	case nil:
		return "null"
	case json.Number:
		return "a number"
	}
	return fmt.Sprintf("%v", tok)
}
