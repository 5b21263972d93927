package spec

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"gopkg.in/yaml.v3"
)

// Parse reads one spec in the YAML format described in the package
// documentation, applies the defaults and checks it, with the default
// Limits. On failure it returns an *Error, an ErrorList (several problems,
// sorted by position) or, if r fails, the read error wrapped.
func Parse(r io.Reader) (*Network, error) { return ParseLimits(r, Limits{}) }

// ParseLimits is Parse with the given limits. It reads at most
// lim.MaxBytes+1 bytes from r, so an oversized input fails fast with
// ErrTooLarge.
func ParseLimits(r io.Reader, lim Limits) (*Network, error) {
	lim = lim.withDefaults()
	data, err := io.ReadAll(io.LimitReader(r, lim.MaxBytes+1))
	if err != nil {
		return nil, fmt.Errorf("spec: read: %w", err)
	}
	if int64(len(data)) > lim.MaxBytes {
		return nil, &Error{Err: newDetail(ErrTooLarge, "spec is larger than the limit of %d bytes", lim.MaxBytes)}
	}
	root, e := decode(data)
	if e != nil {
		return nil, e
	}
	if e := checkExpansion(root, len(data), lim); e != nil {
		return nil, e
	}
	p := &parser{lim: lim, locs: make(map[string]loc), bad: make(map[string]bool),
		nulls: make(map[string]*yaml.Node), keys: make(map[string]loc),
		quiet: make(map[string]bool), untyped: make(map[string]bool)}
	n := p.network(root)
	for _, e := range n.check(lim) {
		if p.followOn(e) {
			continue
		}
		if l, ok := p.keys[e.Field]; ok && errors.Is(e, ErrUnknownName) {
			e.Line, e.Column = l.line, l.col
		} else {
			e.Line, e.Column, e.Field = p.locate(e.Field)
		}
		p.errs = append(p.errs, e)
	}
	if err := asError(p.errs); err != nil {
		return nil, err
	}
	return n, nil
}

// decode turns data into the root node of its only document.
func decode(data []byte) (root *yaml.Node, e *Error) {
	if e := scanChars(data); e != nil {
		return nil, e
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := safeDecode(dec, &doc); err != nil {
		if err == io.EOF {
			return nil, &Error{Err: newDetail(ErrEmpty, "empty spec (want a mapping with at least version, inputs and output)")}
		}
		return nil, syntaxError(data, err)
	}
	var next yaml.Node
	switch err := safeDecode(dec, &next); {
	case err == io.EOF:
	case err != nil:
		return nil, syntaxError(data, err)
	default:
		return nil, &Error{Line: next.Line, Column: next.Column,
			Err: newDetail(ErrSyntax, "syntax: more than one YAML document (a spec is one document)")}
	}
	if len(doc.Content) == 0 {
		return nil, &Error{Err: newDetail(ErrEmpty, "empty spec (want a mapping with at least version, inputs and output)")}
	}
	root = doc.Content[0]
	if root.Kind == yaml.ScalarNode && root.ShortTag() == "!!null" {
		return nil, &Error{Line: root.Line, Column: root.Column,
			Err: newDetail(ErrEmpty, "empty spec (want a mapping with at least version, inputs and output)")}
	}
	return root, nil
}

// safeDecode runs dec.Decode and turns a panic inside the YAML decoder into
// an error: input from a file must never crash the caller.
func safeDecode(dec *yaml.Decoder, v *yaml.Node) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("yaml: decoder failed: %v", r)
		}
	}()
	return dec.Decode(v)
}

// scanChars rejects bytes that YAML 1.2 (§5.1, character set; §5.2, UTF-8
// encoding) does not allow in a stream, with their exact position; the YAML
// decoder reports these without a line.
func scanChars(data []byte) *Error {
	line, col := 1, 1
	for i := 0; i < len(data); {
		r, w := utf8.DecodeRune(data[i:])
		switch {
		case r == utf8.RuneError && w == 1:
			return &Error{Line: line, Column: col, Err: newDetail(ErrSyntax, "syntax: invalid UTF-8 byte 0x%02x (a spec is UTF-8 text)", data[i])}
		case r == '\n':
			line, col = line+1, 0
		case r == '\t' || r == '\r' || r == 0x85:
		case r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0) || (r >= 0xd800 && r < 0xe000) || r == 0xfffe || r == 0xffff:
			return &Error{Line: line, Column: col, Err: newDetail(ErrSyntax, "syntax: control character %U is not allowed", r)}
		}
		i += w
		col++
	}
	return nil
}

var (
	lineRE   = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)
	anchorRE = regexp.MustCompile(`^yaml: unknown anchor '(.*)' referenced$`)
)

// syntaxError converts an error of the YAML decoder, whose position is only
// in its text ("yaml: line 3: ..."), into an *Error. The decoder omits the
// line when it is the first one. A tab in the indentation near the failing
// line gets its own message with the tab's position.
func syntaxError(data []byte, err error) *Error {
	msg := err.Error()
	line := 1
	if m := lineRE.FindStringSubmatch(msg); m != nil {
		line, _ = strconv.Atoi(m[1])
		msg = m[2]
		if parserProblem(msg) {
			// The decoder prints a 0-based line for parser (not scanner)
			// problems: the start of the enclosing construct or the problem.
			line++
		}
	} else if m := anchorRE.FindStringSubmatch(msg); m != nil {
		if l, c := find(data, "*"+m[1]); l > 0 {
			return &Error{Line: l, Column: c, Err: newDetail(ErrSyntax, "syntax: alias *%s refers to no anchor", m[1])}
		}
	}
	msg = strings.TrimPrefix(msg, "yaml: ")
	// The line may still be one before the faulty one, so look at the line
	// after it too.
	if l, c := tabIndent(data, line+1); l > 0 {
		return &Error{Line: l, Column: c, Err: newDetail(ErrSyntax,
			"syntax: tab character in indentation (YAML 1.2 §6.1 allows only spaces; YAML said: %s)", msg)}
	}
	return &Error{Line: line, Err: newDetail(ErrSyntax, "syntax: %s", msg)}
}

// parserProblem reports whether msg is one of the problems of the YAML
// decoder's parser stage, whose line numbers count from 0.
func parserProblem(msg string) bool {
	switch msg {
	case "did not find expected ',' or ']'", "did not find expected ',' or '}'",
		"did not find expected '-' indicator", "did not find expected <document start>",
		"did not find expected <stream-start>", "did not find expected key",
		"did not find expected node content", "found duplicate %TAG directive",
		"found duplicate %YAML directive", "found incompatible YAML document",
		"found undefined tag handle":
		return true
	}
	return false
}

// tabIndent returns the position of the first tab in the leading white
// space of a non-blank line at or before maxLine, or 0, 0.
func tabIndent(data []byte, maxLine int) (line, col int) {
	for i, l := range bytes.Split(data, []byte("\n")) {
		if i+1 > maxLine {
			break
		}
		rest := bytes.TrimLeft(l, " \t")
		if len(rest) == 0 || rest[0] == '\r' {
			continue
		}
		if j := bytes.IndexByte(l[:len(l)-len(rest)], '\t'); j >= 0 {
			return i + 1, j + 1
		}
	}
	return 0, 0
}

// find returns the 1-based line and rune column of the first occurrence of
// s in data, or 0, 0.
func find(data []byte, s string) (line, col int) {
	i := bytes.Index(data, []byte(s))
	if i < 0 {
		return 0, 0
	}
	start := bytes.LastIndexByte(data[:i], '\n') + 1
	return bytes.Count(data[:i], []byte("\n")) + 1, utf8.RuneCount(data[start:i]) + 1
}

// loc is where a canonical key path was found, and the path as written
// (e.g. "output.units" for canonical "output.classes").
type loc struct {
	line, col int
	field     string
}

type parser struct {
	lim  Limits
	errs []*Error
	locs map[string]loc  // canonical key path → position of its value
	bad  map[string]bool // key paths that already have an error
	// nulls holds the keys written with an empty (null) value, by key
	// path, so that a required key can be reported where it stands.
	nulls map[string]*yaml.Node
	// keys holds the position of a key (not its value) for key paths
	// whose key is itself a name that check may refuse: class_weights.
	keys map[string]loc
	// quiet holds key paths whose check problems follow from one already
	// reported elsewhere (e.g. an empty name after a missing name key).
	quiet map[string]bool
	// untyped holds the paths of inputs whose type could not be read; the
	// check's conflicts between their type and other keys are follow-ons.
	untyped map[string]bool
}

// followOn reports whether e, a problem found by check, only follows from
// a problem the parser already reported.
func (p *parser) followOn(e *Error) bool {
	if p.isBad(e.Field) || p.quiet[e.Field] {
		return true
	}
	if errors.Is(e, ErrConflict) {
		for f := e.Field; f != ""; f = parent(f) {
			if p.untyped[f] {
				return true
			}
		}
	}
	return false
}

func (p *parser) errorf(n *yaml.Node, field string, kind error, format string, args ...any) {
	p.errs = append(p.errs, &Error{Line: n.Line, Column: n.Column, Field: field, Err: newDetail(kind, format, args...)})
	p.bad[field] = true
}

func (p *parser) mark(field string, n *yaml.Node) {
	p.locs[field] = loc{n.Line, n.Column, field}
}

// isBad reports whether field or a key path above it already has an error.
func (p *parser) isBad(field string) bool {
	for f := field; ; f = parent(f) {
		if p.bad[f] {
			return true
		}
		if f == "" {
			return false
		}
	}
}

// locate returns the position of field, or of the nearest key path above it
// that was seen, and the field as the user wrote it.
func (p *parser) locate(field string) (line, col int, name string) {
	if l, ok := p.locs[field]; ok {
		return l.line, l.col, l.field
	}
	for f := parent(field); ; f = parent(f) {
		if l, ok := p.locs[f]; ok {
			return l.line, l.col, field
		}
		if f == "" {
			return 0, 0, field
		}
	}
}

// parent strips the last ".key" or "[i]" from a key path.
func parent(field string) string {
	i := strings.LastIndexAny(field, ".[")
	if i < 0 {
		return ""
	}
	return field[:i]
}

func join(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

// deref follows aliases to the anchored node.
func deref(n *yaml.Node) *yaml.Node {
	for i := 0; n.Kind == yaml.AliasNode && n.Alias != nil && i < 100; i++ {
		n = n.Alias
	}
	return n
}

// describe names what n is, for "got ..." in messages.
func describe(n *yaml.Node) string {
	n = deref(n)
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		switch n.ShortTag() {
		case "!!null":
			return "null"
		case "!!str":
			return strconv.Quote(truncate(n.Value))
		case "!!int":
			return "integer " + truncate(n.Value)
		case "!!float":
			return "number " + truncate(n.Value)
		case "!!bool":
			return n.Value
		}
		return n.ShortTag() + " " + strconv.Quote(truncate(n.Value))
	}
	return "an alias"
}

func truncate(s string) string {
	if len(s) > 40 {
		r := []rune(s)
		if len(r) > 40 {
			return string(r[:37]) + "..."
		}
	}
	return s
}

func isNull(n *yaml.Node) bool {
	n = deref(n)
	return n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null"
}

// fields checks that n is a mapping whose keys are all in known and occur
// once, and returns the values by key. A key with a null value counts as
// absent. It returns nil if n is not a mapping.
func (p *parser) fields(n *yaml.Node, path string, known ...string) map[string]*yaml.Node {
	m := deref(n)
	if m.Kind != yaml.MappingNode {
		p.errorf(n, path, ErrType, "want a mapping, got %s", describe(n))
		return nil
	}
	out := make(map[string]*yaml.Node, len(known))
	first := make(map[string]*yaml.Node, len(known))
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := deref(m.Content[i]), m.Content[i+1]
		if k.Kind != yaml.ScalarNode {
			p.errorf(m.Content[i], join(path, "?"), ErrType, "want a key name, got %s", describe(k))
			continue
		}
		field := join(path, k.Value)
		if f, dup := first[k.Value]; dup {
			p.errorf(m.Content[i], field, ErrDuplicate, "duplicate key %q (first at line %d)", k.Value, f.Line)
			continue
		}
		first[k.Value] = m.Content[i]
		if !contains(known, k.Value) {
			p.errorf(m.Content[i], field, ErrUnknownField, "unknown key %q (want one of %s)", truncate(k.Value), strings.Join(known, ", "))
			continue
		}
		if isNull(v) {
			p.nulls[field] = v
			continue
		}
		out[k.Value] = v
	}
	return out
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// require reports a missing key of the mapping m.
func (p *parser) require(f map[string]*yaml.Node, m *yaml.Node, path, key, want string) (*yaml.Node, bool) {
	if v, ok := f[key]; ok {
		return v, true
	}
	field := join(path, key)
	if v, ok := p.nulls[field]; ok {
		p.errorf(v, field, ErrMissingField, "key %s has no value (%s)", key, want)
		return nil, false
	}
	p.errorf(m, field, ErrMissingField, "missing key %s (%s)", key, want)
	return nil, false
}

// maxExact is the largest integer a float64 holds exactly, 2^53.
const maxExact = 1 << 53

// integer reads an integer scalar. A number written in float form, such as
// 1e3, is accepted when it is a whole number of magnitude at most 2^53.
func (p *parser) integer(n *yaml.Node, field string) (int, bool) {
	p.mark(field, n)
	v, ok := p.number(n, field, "an integer")
	if !ok {
		return 0, false
	}
	switch x := v.(type) {
	case int:
		return x, true
	case int64:
		if x >= math.MinInt && x <= math.MaxInt {
			return int(x), true
		}
	case float64:
		if x != math.Trunc(x) || math.IsInf(x, 0) || math.IsNaN(x) {
			p.errorf(n, field, ErrType, "want an integer, got %s", describe(n))
			return 0, false
		}
		if math.Abs(x) <= maxExact {
			return int(x), true
		}
	}
	p.errorf(n, field, ErrRange, "integer %s is too large", truncate(deref(n).Value))
	return 0, false
}

// unsigned reads an integer in [0, 2^64−1].
func (p *parser) unsigned(n *yaml.Node, field string) (uint64, bool) {
	p.mark(field, n)
	v, ok := p.number(n, field, "an integer ≥ 0")
	if !ok {
		return 0, false
	}
	neg := false
	switch x := v.(type) {
	case int:
		if x >= 0 {
			return uint64(x), true
		}
		neg = true
	case int64:
		if x >= 0 {
			return uint64(x), true
		}
		neg = true
	case uint64:
		return x, true
	case float64:
		if x != math.Trunc(x) || math.IsInf(x, 0) || math.IsNaN(x) {
			p.errorf(n, field, ErrType, "want an integer ≥ 0, got %s", describe(n))
			return 0, false
		}
		if x >= 0 && x <= maxExact {
			return uint64(x), true
		}
		neg = x < 0
	}
	if neg {
		p.errorf(n, field, ErrRange, "want an integer ≥ 0, got %s", truncate(deref(n).Value))
	} else {
		p.errorf(n, field, ErrRange, "integer %s is too large", truncate(deref(n).Value))
	}
	return 0, false
}

// float reads a number; NaN and infinities are passed on for check to
// report.
func (p *parser) float(n *yaml.Node, field string) (float64, bool) {
	p.mark(field, n)
	v, ok := p.number(n, field, "a number")
	if !ok {
		return 0, false
	}
	switch x := v.(type) {
	case int:
		return float64(x), true
	case int64:
		return float64(x), true
	case uint64:
		return float64(x), true
	case float64:
		return x, true
	}
	p.errorf(n, field, ErrType, "want a number, got %s", describe(n))
	return 0, false
}

// number decodes an !!int or !!float scalar into int, int64, uint64 or
// float64.
func (p *parser) number(n *yaml.Node, field, want string) (any, bool) {
	s := deref(n)
	if s.Kind != yaml.ScalarNode || (s.ShortTag() != "!!int" && s.ShortTag() != "!!float") {
		p.errorf(n, field, ErrType, "want %s, got %s", want, describe(n))
		return nil, false
	}
	var v any
	if err := s.Decode(&v); err != nil {
		p.errorf(n, field, ErrType, "want %s, got %q tagged %s", want, truncate(s.Value), s.ShortTag())
		return nil, false
	}
	return v, true
}

func (p *parser) boolean(n *yaml.Node, field string) (bool, bool) {
	p.mark(field, n)
	s := deref(n)
	var v bool
	if s.Kind != yaml.ScalarNode || s.ShortTag() != "!!bool" || s.Decode(&v) != nil {
		p.errorf(n, field, ErrType, "want true or false, got %s", describe(n))
		return false, false
	}
	return v, true
}

// text reads any non-null scalar as text, so `classes: [0, 1]` gives the
// names "0" and "1".
func (p *parser) text(n *yaml.Node, field, want string) (string, bool) {
	p.mark(field, n)
	s := deref(n)
	if s.Kind != yaml.ScalarNode || s.ShortTag() == "!!null" {
		p.errorf(n, field, ErrType, "want %s, got %s", want, describe(n))
		return "", false
	}
	return s.Value, true
}

// list reads a list of texts; want describes one entry. It returns false,
// without reporting, when n is not a list.
func (p *parser) list(n *yaml.Node, field, want string) ([]string, bool) {
	p.mark(field, n)
	s := deref(n)
	if s.Kind != yaml.SequenceNode {
		return nil, false
	}
	out := make([]string, 0, len(s.Content))
	for i, c := range s.Content {
		v, _ := p.text(c, field+"["+strconv.Itoa(i)+"]", want)
		out = append(out, v)
	}
	return out, true
}

func (p *parser) network(root *yaml.Node) *Network {
	n := &Network{
		Output: Output{Activation: Softmax},
		Init:   Init{Scheme: GlorotUniform, Seed: 1},
	}
	p.mark("", root)
	f := p.fields(root, "", "version", "name", "inputs", "missing_tokens", "hidden", "output", "penalty", "init", "train")
	if f == nil {
		return n
	}
	if v, ok := p.require(f, root, "", "version", "want 1"); ok {
		n.Version, _ = p.integer(v, "version")
	}
	if v, ok := f["name"]; ok {
		n.Name, _ = p.text(v, "name", "text")
	}
	if v, ok := p.require(f, root, "", "inputs", "a count, or a list of inputs"); ok {
		switch deref(v).Kind {
		case yaml.SequenceNode:
			p.inputs(n, v)
		case yaml.ScalarNode:
			n.Inputs, _ = p.integer(v, "inputs")
		default:
			p.errorf(v, "inputs", ErrType, "want a count or a list of inputs (names or mappings), got %s", describe(v))
		}
	}
	if v, ok := f["missing_tokens"]; ok {
		if list, ok := p.list(v, "missing_tokens", "a missing token (text)"); ok {
			n.MissingTokens = list
		} else {
			p.errorf(v, "missing_tokens", ErrType, "want a list of cell texts, got %s", describe(v))
		}
	} else {
		n.MissingTokens = slices.Clone(DefaultMissingTokens)
	}
	if v, ok := f["hidden"]; ok {
		p.hidden(n, v)
	}
	if v, ok := p.require(f, root, "", "output", "a mapping with classes or units"); ok {
		p.output(n, v)
	}
	if v, ok := f["penalty"]; ok {
		p.penalty(n, v)
	}
	if v, ok := f["init"]; ok {
		p.init(n, v)
	}
	if v, ok := f["train"]; ok {
		p.train(n, v)
	}
	return n
}

func (p *parser) hidden(n *Network, v *yaml.Node) {
	p.mark("hidden", v)
	s := deref(v)
	if s.Kind != yaml.SequenceNode {
		p.errorf(v, "hidden", ErrType, "want a list of layers, got %s", describe(v))
		return
	}
	if len(s.Content) == 0 {
		return
	}
	n.Hidden = make([]Layer, len(s.Content))
	for i, c := range s.Content {
		path := "hidden[" + strconv.Itoa(i) + "]"
		p.mark(path, c)
		f := p.fields(c, path, "units", "activation")
		if f == nil {
			continue
		}
		h := &n.Hidden[i]
		if u, ok := p.require(f, c, path, "units", "want an integer ≥ 1"); ok {
			h.Units, _ = p.integer(u, path+".units")
		}
		if a, ok := p.require(f, c, path, "activation", "want one of "+hiddenNames); ok {
			if act, ok := parseName(p, a, path+".activation", "activation", parseActivation, hiddenNames); ok {
				h.Activation = act
			}
		}
	}
}

func (p *parser) output(n *Network, v *yaml.Node) {
	p.mark("output", v)
	f := p.fields(v, "output", "classes", "units", "activation", "multilabel")
	if f == nil {
		return
	}
	cv, hasClasses := f["classes"]
	uv, hasUnits := f["units"]
	switch {
	case hasClasses && hasUnits:
		second, field := uv, "output.units"
		if before(uv, cv) {
			second, field = cv, "output.classes"
		}
		p.errorf(second, field, ErrConflict, "give classes or units, not both")
		p.bad["output.classes"] = true
	case hasClasses:
		if names, ok := p.list(cv, "output.classes", "a class name"); ok {
			n.Output.Classes = names
		} else {
			p.errorf(cv, "output.classes", ErrType, "want a list of class names, got %s", describe(cv))
		}
	case hasUnits:
		k, ok := p.integer(uv, "output.units")
		p.locs["output.classes"] = loc{uv.Line, uv.Column, "output.units"}
		if !ok {
			p.bad["output.classes"] = true
			break
		}
		if k > p.lim.MaxClasses {
			p.errs = append(p.errs, &Error{Line: uv.Line, Column: uv.Column, Field: "output.units",
				Err: newDetail(ErrTooLarge, "%d classes exceed the limit %d", k, p.lim.MaxClasses)})
			p.bad["output.classes"] = true
			break
		}
		n.Output.Classes = make([]string, max(k, 0))
		for i := range n.Output.Classes {
			n.Output.Classes[i] = strconv.Itoa(i)
		}
	default:
		p.errorf(v, "output.classes", ErrMissingField, "missing classes or units (a list of class names, or a count)")
	}
	if a, ok := f["activation"]; ok {
		if act, ok := parseName(p, a, "output.activation", "activation", parseActivation, outputNames); ok {
			n.Output.Activation = act
		}
	}
	if m, ok := f["multilabel"]; ok {
		n.Output.Multilabel, _ = p.boolean(m, "output.multilabel")
	}
}

// parseName reads the scalar x at field as a name that parse turns into a
// typed constant (an activation, scheme or optimizer). An unknown name is
// reported with the allowed ones and gives the zero value; ok is false only
// when x is not text (also reported).
func parseName[T any](p *parser, x *yaml.Node, field, kind string, parse func(string) (T, bool), allowed string) (v T, ok bool) {
	name, ok := p.text(x, field, article(kind)+" "+kind+" name")
	if !ok {
		return v, false
	}
	v, known := parse(name)
	if !known {
		p.errorf(x, field, ErrUnknownName, "unknown %s %q (want one of %s)", kind, truncate(name), allowed)
	}
	return v, true
}

// article returns "an" before a vowel, else "a".
func article(word string) string {
	if strings.ContainsRune("aeiou", rune(word[0])) {
		return "an"
	}
	return "a"
}

func before(a, b *yaml.Node) bool {
	return a.Line < b.Line || (a.Line == b.Line && a.Column < b.Column)
}

func (p *parser) penalty(n *Network, v *yaml.Node) {
	p.mark("penalty", v)
	f := p.fields(v, "penalty", "l2", "l1", "bias")
	if x, ok := f["l2"]; ok {
		n.Penalty.L2, _ = p.float(x, "penalty.l2")
	}
	if x, ok := f["l1"]; ok {
		n.Penalty.L1, _ = p.float(x, "penalty.l1")
	}
	if x, ok := f["bias"]; ok {
		n.Penalty.Bias, _ = p.boolean(x, "penalty.bias")
	}
}

func (p *parser) init(n *Network, v *yaml.Node) {
	p.mark("init", v)
	f := p.fields(v, "init", "scheme", "scale", "seed")
	if x, ok := f["scheme"]; ok {
		if s, ok := parseName(p, x, "init.scheme", "scheme", parseScheme, schemeList); ok {
			if s == 0 {
				s = GlorotUniform // reported; keep later checks quiet
			}
			n.Init.Scheme = s
		}
	}
	if x, ok := f["scale"]; ok {
		n.Init.Scale, _ = p.float(x, "init.scale")
	}
	if x, ok := f["seed"]; ok {
		n.Init.Seed, _ = p.unsigned(x, "init.seed")
	}
}

func (p *parser) train(n *Network, v *yaml.Node) {
	p.mark("train", v)
	f := p.fields(v, "train", "optimizer", "iterations", "batch", "rate", "tolerance", "class_weights")
	if x, ok := f["optimizer"]; ok {
		if o, ok := parseName(p, x, "train.optimizer", "optimizer", ParseOptimizer, optimList); ok {
			n.Train.Optimizer = o
		}
	}
	if x, ok := f["iterations"]; ok {
		n.Train.Iterations, _ = p.integer(x, "train.iterations")
	}
	if x, ok := f["batch"]; ok {
		n.Train.Batch, _ = p.integer(x, "train.batch")
	}
	if x, ok := f["rate"]; ok {
		n.Train.Rate, _ = p.float(x, "train.rate")
	}
	if x, ok := f["tolerance"]; ok {
		n.Train.Tolerance, _ = p.float(x, "train.tolerance")
	}
	if x, ok := f["class_weights"]; ok {
		p.classWeights(n, x)
	}
}

// inputs reads the list of raw inputs, each a bare name (a number input)
// or a mapping with name, type, levels, missing and unknown.
func (p *parser) inputs(n *Network, v *yaml.Node) {
	p.mark("inputs", v)
	s := deref(v)
	n.Inputs = len(s.Content)
	n.Features = make([]string, len(s.Content))
	n.Types = make([]Input, len(s.Content))
	for i, c := range s.Content {
		path := "inputs[" + strconv.Itoa(i) + "]"
		if deref(c).Kind != yaml.MappingNode {
			n.Features[i], _ = p.text(c, path, "an input name or a mapping with name")
			continue
		}
		p.mark(path, c)
		f := p.fields(c, path, "name", "type", "levels", "missing", "unknown")
		if f == nil {
			continue
		}
		in := &n.Types[i]
		if x, ok := p.require(f, c, path, "name", "want the input's name"); ok {
			var named bool
			n.Features[i], named = p.text(x, path+".name", "an input name")
			p.quiet[path] = !named
			// Problems with the name (empty, duplicate) are reported
			// under the entry's path; point them at the name.
			p.locs[path] = loc{x.Line, x.Column, path + ".name"}
		} else {
			p.quiet[path] = true
		}
		if x, ok := f["type"]; ok {
			t, ok := parseName(p, x, path+".type", "input type", parseInputType, inputTypeList)
			if _, known := parseInputType(deref(x).Value); !ok || !known {
				p.untyped[path] = true
			}
			in.Type = t
		}
		if x, ok := f["levels"]; ok {
			p.levels(in, x, path+".levels")
		}
		if x, ok := f["missing"]; ok {
			p.missing(in, x, path+".missing")
		}
		if x, ok := f["unknown"]; ok {
			if r, ok := parseName(p, x, path+".unknown", "unknown rule", parseUnknownRule, unknownList); ok {
				in.Unknown = r
			}
		}
	}
}

// levels reads a category's declared levels, refusing more than MaxLevels
// before it copies them.
func (p *parser) levels(in *Input, x *yaml.Node, field string) {
	s := deref(x)
	if s.Kind != yaml.SequenceNode {
		p.mark(field, x)
		p.errorf(x, field, ErrType, "want a list of level names, got %s", describe(x))
		return
	}
	if len(s.Content) > p.lim.MaxLevels {
		p.mark(field, x)
		p.errorf(x, field, ErrTooLarge, "%d levels exceed the limit %d", len(s.Content), p.lim.MaxLevels)
		return
	}
	in.Levels, _ = p.list(x, field, "a level name")
}

// missing reads a missing rule: a word, or a number (a constant fill).
func (p *parser) missing(in *Input, x *yaml.Node, field string) {
	if s := deref(x); s.Kind == yaml.ScalarNode && (s.ShortTag() == "!!int" || s.ShortTag() == "!!float") {
		if v, ok := p.float(x, field); ok {
			in.Missing, in.Fill = MissingConstant, v
		}
		return
	}
	word, ok := p.text(x, field, "a missing rule ("+missingList+")")
	if !ok {
		return
	}
	r, known := parseMissingRule(word)
	if !known {
		hint := ""
		if word == "constant" {
			hint = "; write the constant itself, e.g. missing: 0"
		}
		p.errorf(x, field, ErrUnknownName, "unknown missing rule %q (want %s)%s", truncate(word), missingList, hint)
		return
	}
	in.Missing = r
}

// classWeights reads `balanced` or a mapping of class names to weights.
func (p *parser) classWeights(n *Network, x *yaml.Node) {
	const field = "train.class_weights"
	p.mark(field, x)
	s := deref(x)
	switch s.Kind {
	case yaml.ScalarNode:
		word, ok := p.text(x, field, "balanced, or a mapping of class names to weights")
		if !ok {
			return
		}
		if word != "balanced" {
			p.errorf(x, field, ErrUnknownName, "unknown class weights %q (want balanced, or a mapping of class names to weights > 0)", truncate(word))
			return
		}
		n.Train.ClassWeights.Balanced = true
		return
	case yaml.MappingNode:
	default:
		p.errorf(x, field, ErrType, "want balanced, or a mapping of class names to weights > 0, got %s", describe(x))
		return
	}
	by := make(map[string]float64, len(s.Content)/2)
	first := make(map[string]*yaml.Node, len(s.Content)/2)
	for i := 0; i+1 < len(s.Content); i += 2 {
		k, v := deref(s.Content[i]), s.Content[i+1]
		if k.Kind != yaml.ScalarNode || k.ShortTag() == "!!null" {
			p.errorf(s.Content[i], join(field, "?"), ErrType, "want a class name, got %s", describe(k))
			continue
		}
		kf := weightField(k.Value)
		if f, dup := first[k.Value]; dup {
			p.errorf(s.Content[i], kf, ErrDuplicate, "duplicate class %q (first at line %d)", truncate(k.Value), f.Line)
			continue
		}
		first[k.Value] = s.Content[i]
		p.keys[kf] = loc{s.Content[i].Line, s.Content[i].Column, kf}
		if w, ok := p.float(v, kf); ok {
			by[k.Value] = w
		}
	}
	if len(by) > 0 {
		n.Train.ClassWeights.By = by
	}
}
