package nn

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"hash"
	"io"
	"io/fs"
	"math"
	"os"
	"reflect"
	"strings"
	"time"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/internal/atomicfile"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// The model file is one JSON document (RFC 8259) of this shape:
//
//	{
//	  "format":   "seine-model",
//	  "version":  2,
//	  "spec":     "<the resolved spec as canonical YAML text>",
//	  "classes":  ["human", …],
//	  "label":    "class",
//	  "decision": {"temperature": 1.7, "thresholds": [0.31],
//	               "rule": "max-f1"}                  (left out when none)
//	  "encoder":  {"missing_tokens": ["", "?", "NA"],
//	               "inputs": [{"name": "req_per_min", "type": "number",
//	                           "missing": "median", "fill": 12.5,
//	                           "mean": 30.1, "scale": 11.7},
//	                          {"name": "plan", "type": "category",
//	                           "levels": ["basic", "pro", "team"],
//	                           "missing": "mode", "fill": 1,
//	                           "unknown": "ignore"}, …]},
//	  "summary":  {…},
//	  "params":   {"count": P, "encoding": "float64-le-base64",
//	               "data": "<base64 of P little-endian IEEE 754 doubles>"},
//	  "sha256":   "<hex of the content digest>"
//	}
//
// "fill" is the value that replaces a missing number (null under the rule
// refuse), or for a category under the rule mode the index of the level
// that replaces a missing value. "mean" and "scale" standardise a number
// after filling: x' = (x − mean)/scale.
//
// The content digest is the SHA-256 of everything that changes what the
// model predicts, in a fixed binary form: the spec text, the class names,
// the label name, the encoder (missing tokens, then per input its name,
// type, levels, rules, fill, mean and scale), the decision (temperature,
// thresholds, rule, target; a nil marker when none) and the raw params
// bytes, each preceded by its length as a little-endian uint64 (a nil list
// as 2⁶⁴−1) and numbers as their IEEE 754 bits. The summary is
// informational and left out. So a changed digit anywhere that matters (an
// input's mean, a level, a layer width, a threshold) fails the check
// instead of silently shifting every prediction.
//
// Version 1 files, written before inputs had types, hold "features" (names
// or null) and "scaler" ({"mean": […], "scale": […]} or null) instead of
// "label" and "encoder", and a digest over spec, classes, features, scaler
// and params. They still load: every input is a plain number.
//
// The params are stored as raw bits so that they round-trip bit for bit;
// other numbers are written in the shortest form that reads back to the
// same float64 (strconv 'g', -1), which also round-trips exactly. Object
// keys must be unique: a duplicate key anywhere is an error (RFC 8259 §4
// leaves their meaning to the reader; this one refuses to guess).
const (
	FormatName    = "seine-model"
	FormatVersion = 2
	paramEncoding = "float64-le-base64"
)

// DefaultMaxModelBytes is the size limit of ReadModel.
const DefaultMaxModelBytes = 256 << 20

// Errors of reading a model file; each is wrapped with detail.
var (
	ErrFormat   = errors.New("nn: not a seine model file")
	ErrVersion  = errors.New("nn: unsupported model format version")
	ErrChecksum = errors.New("nn: params checksum mismatch")
	ErrTooLarge = errors.New("nn: model file too large")
)

type fileModel struct {
	Format   string       `json:"format"`
	Version  int          `json:"version"`
	Spec     string       `json:"spec"`
	Classes  []string     `json:"classes"`
	Label    *string      `json:"label,omitempty"`    // version 2
	Encoder  *fileEncoder `json:"encoder,omitempty"`  // version 2
	Decision *Decision    `json:"decision,omitempty"` // version 2, when not zero
	Features []string     `json:"features,omitempty"` // version 1
	Scaler   *fileScaler  `json:"scaler,omitempty"`   // version 1
	Summary  fileSummary  `json:"summary"`
	Params   fileParams   `json:"params"`
	SHA256   string       `json:"sha256"`
}

type fileEncoder struct {
	MissingTokens []string    `json:"missing_tokens"`
	Inputs        []fileInput `json:"inputs"`
}

type fileInput struct {
	Name    string   `json:"name"`
	Type    string   `json:"type"`
	Levels  []string `json:"levels,omitempty"`
	Missing string   `json:"missing"`
	Fill    *float64 `json:"fill"`
	Mean    *float64 `json:"mean,omitempty"`
	Scale   *float64 `json:"scale,omitempty"`
	Unknown string   `json:"unknown,omitempty"`
}

type fileScaler struct {
	Mean  []float64 `json:"mean"`
	Scale []float64 `json:"scale"`
}

type fileParams struct {
	Count    int       `json:"count"`
	Encoding string    `json:"encoding"`
	Data     paramData `json:"data"` // base64 of little-endian float64s
}

// hasher writes the digest's fixed binary form.
type hasher struct {
	h hash.Hash
	n [8]byte
}

func (h *hasher) length(k int, isNil bool) {
	v := uint64(k)
	if isNil {
		v = math.MaxUint64
	}
	binary.LittleEndian.PutUint64(h.n[:], v)
	h.h.Write(h.n[:])
}

func (h *hasher) text(t string) {
	h.length(len(t), false)
	h.h.Write([]byte(t))
}

func (h *hasher) list(l []string) {
	h.length(len(l), l == nil)
	for _, t := range l {
		h.text(t)
	}
}

func (h *hasher) float(x float64) {
	binary.LittleEndian.PutUint64(h.n[:], math.Float64bits(x))
	h.h.Write(h.n[:])
}

func (h *hasher) floats(v []float64) {
	h.length(len(v), v == nil)
	for _, x := range v {
		h.float(x)
	}
}

func (h *hasher) sum(raw []byte) string {
	h.length(len(raw), false)
	h.h.Write(raw)
	return hex.EncodeToString(h.h.Sum(nil))
}

// digestV1 returns the hex content digest of a version 1 file's parts.
func digestV1(specText string, classes, features []string, sc *fileScaler, raw []byte) string {
	h := &hasher{h: sha256.New()}
	h.text(specText)
	h.list(classes)
	h.list(features)
	if sc == nil {
		h.length(0, true)
	} else {
		h.length(2, false)
		h.floats(sc.Mean)
		h.floats(sc.Scale)
	}
	return h.sum(raw)
}

// digest returns the hex content digest of a version 2 file's parts (see
// the format description above). Absent numbers (null or left out) count
// as NaN.
func digest(specText string, classes []string, label string, enc *fileEncoder, dec *Decision, raw []byte) string {
	h := &hasher{h: sha256.New()}
	h.text(specText)
	h.list(classes)
	h.text(label)
	h.list(enc.MissingTokens)
	h.length(len(enc.Inputs), enc.Inputs == nil)
	num := func(p *float64) {
		if p == nil {
			h.float(math.NaN())
			return
		}
		h.float(*p)
	}
	for _, t := range enc.Inputs {
		h.text(t.Name)
		h.text(t.Type)
		h.list(t.Levels)
		h.text(t.Missing)
		h.text(t.Unknown)
		num(t.Fill)
		num(t.Mean)
		num(t.Scale)
	}
	if dec == nil {
		h.length(0, true)
	} else {
		h.length(4, false)
		h.float(dec.Temperature)
		h.floats(dec.Thresholds)
		h.text(dec.Rule)
		h.float(dec.Target)
	}
	return h.sum(raw)
}

// toFileEncoder is the file form of enc.
func toFileEncoder(enc *encode.Encoder) *fileEncoder {
	fe := &fileEncoder{MissingTokens: enc.MissingTokens()}
	for _, t := range enc.Inputs() {
		fi := fileInput{Name: t.Name, Type: t.Type.String(), Missing: t.Missing.String(), Fill: nullable(t.Fill)}
		if t.Type == spec.CategoryInput {
			fi.Levels = t.Levels
			fi.Unknown = t.Unknown.String()
		} else {
			mean, scale := t.Mean, t.Scale
			fi.Mean, fi.Scale = &mean, &scale
		}
		fe.Inputs = append(fe.Inputs, fi)
	}
	return fe
}

// fromFileEncoder builds the encoder a file describes.
func fromFileEncoder(fe *fileEncoder) (*encode.Encoder, error) {
	if fe.MissingTokens == nil {
		return nil, fmt.Errorf("%w: encoder.missing_tokens is missing", ErrFormat)
	}
	in := make([]encode.Input, len(fe.Inputs))
	for i, fi := range fe.Inputs {
		where := fmt.Sprintf("encoder.inputs[%d]", i)
		t := &in[i]
		t.Name, t.Levels, t.Fill = fi.Name, fi.Levels, fromNullable(fi.Fill)
		switch fi.Type {
		case "number":
			t.Type = spec.NumberInput
			if fi.Mean == nil || fi.Scale == nil {
				return nil, fmt.Errorf("%w: %s: a number needs mean and scale", ErrModel, where)
			}
			t.Mean, t.Scale = *fi.Mean, *fi.Scale
		case "category":
			t.Type = spec.CategoryInput
			if fi.Mean != nil || fi.Scale != nil {
				return nil, fmt.Errorf("%w: %s: a category has no mean or scale", ErrModel, where)
			}
		default:
			return nil, fmt.Errorf("%w: %s.type is %q, want number or category", ErrModel, where, fi.Type)
		}
		var ok bool
		if t.Missing, ok = parseMissing(fi.Missing); !ok {
			return nil, fmt.Errorf("%w: %s.missing is %q", ErrModel, where, fi.Missing)
		}
		switch fi.Unknown {
		case "", "refuse":
			if fi.Unknown == "" && t.Type == spec.CategoryInput {
				return nil, fmt.Errorf("%w: %s.unknown is missing", ErrModel, where)
			}
		case "ignore":
			t.Unknown = spec.UnknownIgnore
		default:
			return nil, fmt.Errorf("%w: %s.unknown is %q", ErrModel, where, fi.Unknown)
		}
		if t.Missing == spec.MissingRefuse && fi.Fill != nil {
			return nil, fmt.Errorf("%w: %s: fill %v under the rule refuse", ErrModel, where, *fi.Fill)
		}
	}
	enc, err := encode.New(in, fe.MissingTokens)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrModel, err)
	}
	return enc, nil
}

func parseMissing(w string) (spec.MissingRule, bool) {
	for r := spec.MissingRefuse; r <= spec.MissingLevel; r++ {
		if r.String() == w {
			return r, true
		}
	}
	return 0, false
}

// fileDuration reads the seconds of a model file's summary: to the nearest
// nanosecond, and 0 for a value that is not a duration (negative, NaN, or
// beyond time.Duration's 292 years).
func fileDuration(sec float64) time.Duration {
	ns := math.Round(sec * float64(time.Second))
	if !(ns >= 0 && ns < math.MaxInt64) {
		return 0
	}
	return time.Duration(ns)
}

// fileSummary is Summary with NaN written as null and the elapsed time in
// seconds.
type fileSummary struct {
	Method           string           `json:"method"`
	Iterations       int              `json:"iterations"`
	Evaluations      float64          `json:"evaluations"`
	Seconds          float64          `json:"seconds"`
	Status           string           `json:"status"`
	Cost             *float64         `json:"cost"`
	TrainRows        int              `json:"train_rows"`
	TrainAccuracy    *float64         `json:"train_accuracy"`
	HoldoutRows      int              `json:"holdout_rows"`
	HoldoutCost      *float64         `json:"holdout_cost"`
	HoldoutAccuracy  *float64         `json:"holdout_accuracy"`
	Seed             uint64           `json:"seed"`
	Library          string           `json:"library"`
	ClassWeights     []float64        `json:"class_weights,omitempty"`
	Operating        []OperatingPoint `json:"operating,omitempty"`
	HoldoutECE       *float64         `json:"holdout_ece,omitempty"`
	HoldoutECEBefore *float64         `json:"holdout_ece_before,omitempty"`
}

func nullable(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func fromNullable(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// WriteTo writes m as a model file to w. It implements io.WriterTo.
// Before writing anything it reads its own bytes back with ReadModel's
// limits, so it never writes a file that ReadModel refuses: such a model
// (one whose spec or learned levels exceed the limits, say) is an error
// that wraps the loader's, and w is left untouched.
func (m *Model) WriteTo(w io.Writer) (int64, error) {
	if m.net == nil {
		if err := m.init(); err != nil {
			return 0, err
		}
	}
	var y bytes.Buffer
	if err := m.spec.WriteYAML(&y); err != nil {
		return 0, fmt.Errorf("nn: writing model spec: %w", err)
	}
	raw := make([]byte, 8*len(m.params))
	for i, v := range m.params {
		binary.LittleEndian.PutUint64(raw[8*i:], math.Float64bits(v))
	}
	label := m.label
	f := fileModel{
		Format: FormatName, Version: FormatVersion, Spec: y.String(),
		Classes: m.classes, Label: &label, Encoder: toFileEncoder(m.enc),
		Params: fileParams{Count: len(m.params), Encoding: paramEncoding, Data: paramData{raw: raw}},
	}
	if !m.decision.IsZero() {
		d := m.decision
		f.Decision = &d
	}
	f.SHA256 = digest(f.Spec, f.Classes, label, f.Encoder, f.Decision, raw)
	s := m.summary
	f.Summary = fileSummary{
		Method: s.Method, Iterations: s.Iterations, Evaluations: s.Evaluations, Seconds: s.Elapsed.Seconds(), Status: s.Status.String(),
		Cost: nullable(s.Cost), TrainRows: s.TrainRows, TrainAccuracy: nullable(s.TrainAccuracy),
		HoldoutRows: s.HoldoutRows, HoldoutCost: nullable(s.HoldoutCost), HoldoutAccuracy: nullable(s.HoldoutAccuracy),
		Seed: s.Seed, Library: s.Library,
		ClassWeights: s.ClassWeights, Operating: s.Operating, HoldoutECE: nullable(s.HoldoutECE), HoldoutECEBefore: nullable(s.HoldoutECEBefore),
	}
	if !finite(f.Summary.Evaluations) {
		f.Summary.Evaluations = 0
	}
	b, err := json.MarshalIndent(f, "", "  ")
	if err != nil {
		return 0, fmt.Errorf("nn: encoding model: %w", err)
	}
	b = append(b, '\n')
	if _, err := ReadModel(bytes.NewReader(b)); err != nil {
		return 0, fmt.Errorf("nn: the model file would not load, so nothing was written: %w", err)
	}
	n, err := w.Write(b)
	return int64(n), err
}

// ReadModel reads a model file written by WriteTo, refusing files larger
// than DefaultMaxModelBytes.
func ReadModel(r io.Reader) (*Model, error) { return ReadModelLimit(r, DefaultMaxModelBytes) }

// ReadModelLimit reads a model file of at most maxBytes bytes (0 means
// DefaultMaxModelBytes). The limit is checked while reading, before the file
// is held in memory whole. It rejects a wrong format name, a newer version, a
// duplicate key, a checksum mismatch, a params count that does not match the
// spec and non-finite params, each with an error that wraps ErrFormat,
// ErrVersion, ErrChecksum, ErrTooLarge or ErrModel.
func ReadModelLimit(r io.Reader, maxBytes int64) (*Model, error) {
	if maxBytes <= 0 {
		maxBytes = DefaultMaxModelBytes
	}
	b, err := readBounded(r, maxBytes)
	if err != nil {
		return nil, err
	}
	if err := checkJSON(b); err != nil {
		return nil, err
	}
	var f fileModel
	// checkJSON has refused every key the format does not spell exactly, so
	// Unmarshal (which, unlike a Decoder, reads b in place) sees only known
	// fields.
	if err := json.Unmarshal(b, &f); err != nil {
		return nil, fmt.Errorf("%w: %s", ErrFormat, jsonErr(b, err))
	}
	b = nil // the decoded parts are all that is needed from here on
	if f.Format != FormatName {
		return nil, fmt.Errorf("%w: format is %q, want %q", ErrFormat, f.Format, FormatName)
	}
	if f.Version < 1 || f.Version > FormatVersion {
		return nil, fmt.Errorf("%w: file has version %d, this library reads 1 to %d", ErrVersion, f.Version, FormatVersion)
	}
	p := f.Params
	if p.Encoding != paramEncoding {
		return nil, fmt.Errorf("%w: params encoding %q, want %q", ErrFormat, p.Encoding, paramEncoding)
	}
	raw := p.Data.raw // base64-decoded by Unmarshal, straight into the params' memory
	var enc *encode.Encoder
	label := ""
	switch f.Version {
	case 1:
		if f.Encoder != nil || f.Label != nil || f.Decision != nil {
			return nil, fmt.Errorf("%w: a version 1 file has no encoder or label", ErrFormat)
		}
		if digestV1(f.Spec, f.Classes, f.Features, f.Scaler, raw) != strings.ToLower(f.SHA256) {
			return nil, fmt.Errorf("%w: the contents do not match the file's sha256 (changed after it was written?)", ErrChecksum)
		}
	default:
		if f.Features != nil || f.Scaler != nil {
			return nil, fmt.Errorf("%w: a version %d file keeps features and scaling in its encoder", ErrFormat, f.Version)
		}
		if f.Encoder == nil || f.Label == nil {
			return nil, fmt.Errorf("%w: the encoder or the label is missing", ErrFormat)
		}
		label = *f.Label
		if digest(f.Spec, f.Classes, label, f.Encoder, f.Decision, raw) != strings.ToLower(f.SHA256) {
			return nil, fmt.Errorf("%w: the contents do not match the file's sha256 (changed after it was written?)", ErrChecksum)
		}
		if enc, err = fromFileEncoder(f.Encoder); err != nil {
			return nil, err
		}
	}
	s, err := spec.Parse(strings.NewReader(f.Spec))
	if err != nil {
		return nil, fmt.Errorf("%w: its spec: %w", ErrModel, err)
	}
	if want := s.ParamCount(); p.Count != want {
		return nil, fmt.Errorf("%w: params count %d, the spec needs %d", ErrModel, p.Count, want)
	}
	if len(raw) != 8*p.Count {
		return nil, fmt.Errorf("%w: params data holds %d bytes, count %d needs %d", ErrModel, len(raw), p.Count, 8*p.Count)
	}
	params := p.Data.v
	if f.Version == 1 {
		if enc, err = v1Encoder(s, f.Features, f.Scaler); err != nil {
			return nil, err
		}
	}
	m := &Model{spec: s, params: params, classes: f.Classes, label: label, enc: enc}
	if f.Decision != nil {
		m.decision = *f.Decision
	}
	fs := f.Summary
	status, ok := optim.ParseStatus(fs.Status)
	if !ok {
		return nil, fmt.Errorf("%w: summary.status is %q, not a status of a run", ErrFormat, fs.Status)
	}
	m.summary = Summary{
		Method: fs.Method, Iterations: fs.Iterations, Evaluations: fs.Evaluations, Elapsed: fileDuration(fs.Seconds), Status: status,
		Cost: fromNullable(fs.Cost), TrainRows: fs.TrainRows, TrainAccuracy: fromNullable(fs.TrainAccuracy),
		HoldoutRows: fs.HoldoutRows, HoldoutCost: fromNullable(fs.HoldoutCost), HoldoutAccuracy: fromNullable(fs.HoldoutAccuracy),
		Seed: fs.Seed, Library: fs.Library,
		ClassWeights: fs.ClassWeights, Operating: fs.Operating, HoldoutECE: fromNullable(fs.HoldoutECE), HoldoutECEBefore: fromNullable(fs.HoldoutECEBefore),
	}
	if err := m.init(); err != nil {
		return nil, err
	}
	return m, nil
}

// v1Encoder is the encoder of a version 1 file: plain numbers named by
// features (or the spec's names, or "x1" …), scaled by sc when it is there.
func v1Encoder(s *spec.Network, features []string, sc *fileScaler) (*encode.Encoder, error) {
	if features == nil {
		features = s.Features
	}
	if features != nil && len(features) != s.Inputs {
		return nil, fmt.Errorf("%w: %d feature names for %d inputs", ErrModel, len(features), s.Inputs)
	}
	if sc != nil && (sc.Mean == nil || sc.Scale == nil) {
		return nil, fmt.Errorf("%w: scaler needs both mean and scale", ErrModel)
	}
	if sc != nil && (len(sc.Mean) != s.Inputs || len(sc.Scale) != s.Inputs) {
		return nil, fmt.Errorf("%w: scaler has %d means and %d scales for %d inputs", ErrModel, len(sc.Mean), len(sc.Scale), s.Inputs)
	}
	var mean, scale []float64
	if sc != nil {
		mean, scale = sc.Mean, sc.Scale
	} else {
		mean, scale = make([]float64, s.Inputs), ones(s.Inputs)
	}
	enc, err := encode.Numbers(features, mean, scale)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrModel, err)
	}
	return enc, nil
}

// formatKeys holds every object key of the format, spelled exactly. Go's
// decoder matches keys whatever their letter case, so a key in another case
// would be read where other JSON readers ignore it: checkJSON refuses any
// key not in this set.
var formatKeys = func() map[string]bool {
	keys := map[string]bool{}
	var walk func(t reflect.Type)
	walk = func(t reflect.Type) {
		for t.Kind() == reflect.Pointer || t.Kind() == reflect.Slice {
			t = t.Elem()
		}
		if t.Kind() != reflect.Struct {
			return
		}
		for i := range t.NumField() {
			f := t.Field(i)
			name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
			if name != "" && name != "-" {
				keys[name] = true
			}
			walk(f.Type)
		}
	}
	walk(reflect.TypeFor[fileModel]())
	return keys
}()

// maxJSONDepth bounds the nesting of arrays and objects in a model file.
// The format itself nests three deep; the bound stops a document of nested
// brackets (a "JSON bomb") before the scan's stack grows with the file.
const maxJSONDepth = 32

// readChunk is the size of the pieces a stream is read in.
const readChunk = 4 << 20

// readBounded reads all of r, refusing more than max bytes, at a memory
// cost of at most max plus one piece for a refused stream and twice the
// size for an accepted one (pieces, then one buffer). A stream that does
// not start like a JSON object (after white space) is refused at its first
// byte, so reading /dev/zero or random bytes costs nothing.
func readBounded(r io.Reader, max int64) ([]byte, error) {
	// A regular file (an *os.File, or a reader that can Stat its file)
	// has a known size: read it into one buffer of that size.
	if st, ok := r.(interface{ Stat() (fs.FileInfo, error) }); ok {
		if fi, err := st.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() <= max {
			b := make([]byte, fi.Size()+1) // one more, to see a file that grew
			k, err := io.ReadFull(r, b)
			switch {
			case err == io.ErrUnexpectedEOF || err == io.EOF:
				b = b[:k]
				if i := bytes.IndexFunc(b, func(c rune) bool { return !isSpace(byte(c)) }); i >= 0 && b[i] != '{' {
					return nil, fmt.Errorf("%w: line %d: the document is not a JSON object (byte %d is %q)", ErrFormat, 1+bytes.Count(b[:i], []byte{'\n'}), i, b[i])
				}
				return b, nil
			case err != nil:
				return nil, fmt.Errorf("nn: reading model: %w", err)
			}
			return nil, fmt.Errorf("%w: the file grew while it was read, past %d bytes", ErrTooLarge, fi.Size())
		}
	}
	var pieces [][]byte
	var n int64
	started := false
	for {
		piece := make([]byte, min(int64(readChunk), max+1-n))
		k, err := io.ReadFull(r, piece)
		piece = piece[:k]
		if !started {
			if i := bytes.IndexFunc(piece, func(c rune) bool { return !isSpace(byte(c)) }); i >= 0 {
				if piece[i] != '{' {
					return nil, fmt.Errorf("%w: line %d: the document is not a JSON object (byte %d is %q)", ErrFormat, 1+bytes.Count(piece[:i], []byte{'\n'}), n+int64(i), piece[i])
				}
				started = true
			}
		}
		pieces = append(pieces, piece)
		n += int64(k)
		if n > max {
			return nil, fmt.Errorf("%w: more than %d bytes", ErrTooLarge, max)
		}
		if err == io.EOF || err == io.ErrUnexpectedEOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("nn: reading model: %w", err)
		}
	}
	if len(pieces) == 1 {
		return pieces[0], nil
	}
	b := make([]byte, 0, n)
	for i, p := range pieces {
		b = append(b, p...)
		pieces[i] = nil
	}
	return b, nil
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' }

// checkJSON scans the document once for its structure: one object, keys
// spelled exactly as the format spells them and unique within their object
// (also when they differ only in letter case), nesting no deeper than
// maxJSONDepth, nothing after the end. It reports the byte offset of a
// problem. It allocates only for keys and the nesting stack, never for a
// string value (the params' base64 may be most of the file); the full
// syntax is checked when the document is decoded.
func checkJSON(b []byte) error {
	type frame struct {
		obj  bool
		keys map[string]bool
	}
	var stack []frame
	i := 0
	skip := func() {
		for i < len(b) && isSpace(b[i]) {
			i++
		}
	}
	// str returns the end of the string literal that starts at b[i] == '"'.
	str := func() (int, error) {
		for j := i + 1; j < len(b); j++ {
			switch b[j] {
			case '\\':
				j++
			case '"':
				return j + 1, nil
			}
		}
		return 0, fmt.Errorf("%w: unexpected end of file in a string that starts at byte %d", ErrFormat, i)
	}
	skip()
	if i == len(b) {
		return fmt.Errorf("%w: unexpected end of file", ErrFormat)
	}
	if b[i] != '{' {
		return fmt.Errorf("%w: the document is not a JSON object", ErrFormat)
	}
	for {
		skip()
		if i == len(b) {
			return fmt.Errorf("%w: unexpected end of file", ErrFormat)
		}
		c := b[i]
		switch {
		case c == '{' || c == '[':
			if len(stack) >= maxJSONDepth {
				return fmt.Errorf("%w: nesting deeper than %d levels near byte %d", ErrFormat, maxJSONDepth, i)
			}
			stack = append(stack, frame{obj: c == '{'})
			i++
			if c == '{' {
				stack[len(stack)-1].keys = map[string]bool{}
				if err := checkKey(b, &i, &stack[len(stack)-1].keys, str, skip); err != nil {
					return err
				}
			}
			continue
		case c == '}' || c == ']':
			if len(stack) == 0 || stack[len(stack)-1].obj != (c == '}') {
				return fmt.Errorf("%w: unexpected %q at byte %d", ErrFormat, c, i)
			}
			stack = stack[:len(stack)-1]
			i++
		case c == '"':
			end, err := str()
			if err != nil {
				return err
			}
			i = end
		default: // a number, true, false or null: up to the next delimiter
			start := i
			for i < len(b) && !isSpace(b[i]) && b[i] != ',' && b[i] != '}' && b[i] != ']' && b[i] != ':' {
				i++
			}
			if i == start {
				return fmt.Errorf("%w: unexpected %q at byte %d", ErrFormat, c, i)
			}
		}
		// After a value: the end of the document, a comma, or a closing
		// bracket (read on the next turn).
		if len(stack) == 0 {
			skip()
			if i != len(b) {
				return fmt.Errorf("%w: data after the end of the document at byte %d", ErrFormat, i)
			}
			return nil
		}
		skip()
		if i < len(b) && b[i] == ',' {
			i++
			if top := &stack[len(stack)-1]; top.obj {
				if err := checkKey(b, &i, &top.keys, str, skip); err != nil {
					return err
				}
			}
		}
	}
}

// checkKey reads an object's next key and its colon at b[*i], if the object
// does not end there, and records it in keys: refused when the format does
// not spell it so, or when a key differing at most in letter case came
// before.
func checkKey(b []byte, i *int, keys *map[string]bool, str func() (int, error), skip func()) error {
	skip()
	if *i < len(b) && b[*i] == '}' {
		return nil
	}
	if *i >= len(b) || b[*i] != '"' {
		return fmt.Errorf("%w: want a key at byte %d", ErrFormat, *i)
	}
	end, err := str()
	if err != nil {
		return err
	}
	var key string
	if err := json.Unmarshal(b[*i:end], &key); err != nil {
		return fmt.Errorf("%w: key at byte %d: %v", ErrFormat, *i, err)
	}
	at := *i
	*i = end
	low := strings.ToLower(key)
	if (*keys)[low] {
		return fmt.Errorf("%w: duplicate key %q near byte %d (keys that differ only in letter case count as the same)", ErrFormat, key, at)
	}
	if !formatKeys[key] {
		return fmt.Errorf("%w: unknown key %q near byte %d (keys are case-sensitive)", ErrFormat, key, at)
	}
	(*keys)[low] = true
	skip()
	if *i >= len(b) || b[*i] != ':' {
		return fmt.Errorf("%w: want ':' after key %q at byte %d", ErrFormat, key, *i)
	}
	*i++
	return nil
}

// jsonErr adds the line and column to a JSON decoding error.
func jsonErr(b []byte, err error) string {
	var off int64 = -1
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		off = se.Offset
	case errors.As(err, &te):
		off = te.Offset
	}
	if off < 0 || off > int64(len(b)) {
		return err.Error()
	}
	line := 1 + bytes.Count(b[:off], []byte{'\n'})
	col := int(off) - bytes.LastIndexByte(b[:off], '\n')
	return fmt.Sprintf("line %d, column %d: %v", line, col, err)
}

// Save writes m to the file at path without ever leaving a half-written or
// lost model (internal/atomicfile): it writes a temporary file in the
// target's folder, syncs it, and renames it over the target; a path that is
// a symbolic link is written through to the file it names, and an existing
// file keeps its permission bits. As WriteTo, it never produces a file that
// Load refuses (the error wraps the loader's). On any failure the old file
// at path is untouched.
func (m *Model) Save(path string) error {
	if err := atomicfile.Write(path, func(w io.Writer) error {
		_, err := m.WriteTo(w)
		return err
	}); err != nil {
		return fmt.Errorf("nn: saving model %s: %w", path, err)
	}
	return nil
}

// Load reads the model file at path.
func Load(path string) (*Model, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("nn: %w", err)
	}
	defer f.Close()
	return readModelFile(f, path)
}

// readModelFile reads the opened model file f. A regular file whose size is
// over DefaultMaxModelBytes is refused from its Stat, before any of it is
// read; other files are bounded while reading, as by ReadModel.
func readModelFile(f fs.File, name string) (*Model, error) {
	if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() > DefaultMaxModelBytes {
		return nil, fmt.Errorf("%s: %w: %d bytes, more than %d", name, ErrTooLarge, fi.Size(), int64(DefaultMaxModelBytes))
	}
	m, err := ReadModel(f)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return m, nil
}

// LoadFS reads the model file name from fsys. With an embed.FS this loads
// a model compiled into the program:
//
//	//go:embed triage.seine.json
//	var files embed.FS
//	model, err := nn.LoadFS(files, "triage.seine.json")
func LoadFS(fsys fs.FS, name string) (*Model, error) {
	f, err := fsys.Open(name)
	if err != nil {
		return nil, fmt.Errorf("nn: %w", err)
	}
	defer f.Close()
	return readModelFile(f, name)
}
