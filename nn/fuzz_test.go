package nn

import (
	"bytes"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/spec"
)

// updateCorpus rewrites testdata/fuzz/FuzzModel from fuzzSeeds:
//
//	go test ./nn -run TestFuzzModelCorpus -update-fuzz-corpus
var updateCorpus = flag.Bool("update-fuzz-corpus", false, "rewrite testdata/fuzz/FuzzModel from the seed generator")

// fuzzSeeds returns named model files: valid ones of each output kind, with
// and without a scaler and feature names, and nearly-valid ones that each
// break one rule of the format. Each is a few KB.
func fuzzSeeds(t testing.TB) map[string][]byte {
	t.Helper()
	seeds := map[string][]byte{}
	write := func(m *Model) []byte {
		var b bytes.Buffer
		_, err := m.WriteTo(&b)
		require.NoError(t, err)
		return b.Bytes()
	}
	soft := testModel(t, spec.Softmax, []string{"x", "y", "z"}, false)
	soft.summary = Summary{Method: "lbfgs", Iterations: 12, Cost: 0.5, HoldoutCost: math.NaN(), Library: Version}
	bin := testModel(t, spec.Sigmoid, []string{"no", "yes"}, false)
	multi := testModel(t, spec.Sigmoid, []string{"p", "q", "r"}, true)
	plain, err := NewModel(testSpec(2, nil, spec.Identity, outSoftmax), []float64{1, -1, 0.5, 2, 0, -2, 0.25, 0.5, -0.75}, nil, nil)
	require.NoError(t, err)
	deep, err := NewModel(testSpec(2, []int{3, 2}, spec.ReLU, outBinary), mustCompile(t, testSpec(2, []int{3, 2}, spec.ReLU, outBinary)).NewParams(), nil, nil)
	require.NoError(t, err)

	good := write(soft)
	seeds["valid_softmax"] = good
	seeds["valid_binary"] = write(bin)
	seeds["valid_multilabel"] = write(multi)
	seeds["valid_noscaler"] = write(plain)
	seeds["valid_deep_relu"] = write(deep)

	edit := func(f func(doc map[string]any)) []byte {
		var doc map[string]any
		require.NoError(t, json.Unmarshal(good, &doc))
		sum := doc["sha256"]
		f(doc)
		if doc["sha256"] == sum {
			seal(t, doc) // consistent but wrong: not a checksum case
		}
		b, err := json.Marshal(doc)
		require.NoError(t, err)
		return b
	}
	params := func(doc map[string]any) map[string]any { return doc["params"].(map[string]any) }
	seeds["bad_truncated"] = good[:len(good)/2]
	seeds["bad_truncated_end"] = good[:len(good)-3]
	flipped := bytes.Clone(good)
	i := bytes.Index(flipped, []byte(`"data": "`)) + 12
	flipped[i] ^= 0x01
	seeds["bad_flipped_byte"] = flipped
	seeds["bad_future_version"] = edit(func(d map[string]any) { d["version"] = FormatVersion + 1 })
	seeds["bad_count_lies"] = edit(func(d map[string]any) { params(d)["count"] = 1 << 40 })
	seeds["bad_checksum"] = edit(func(d map[string]any) { d["sha256"] = strings.Repeat("0", 64) })
	seeds["bad_encoding"] = edit(func(d map[string]any) { params(d)["encoding"] = "float32" })
	seeds["bad_spec"] = edit(func(d map[string]any) { d["spec"] = "version: 1\ninputs: 3\nhidden:\n  - units: 1e12\n" })
	seeds["bad_zero_scale"] = edit(func(d map[string]any) {
		d["encoder"].(map[string]any)["inputs"].([]any)[1].(map[string]any)["scale"] = 0
	})
	seeds["bad_encoder_name"] = edit(func(d map[string]any) {
		d["encoder"].(map[string]any)["inputs"].([]any)[0].(map[string]any)["name"] = "other"
	})
	seeds["bad_case_key"] = bytes.Replace(good, []byte(`"classes": [`), []byte(`"CLASSES": ["p", "q", "r"], "classes": [`), 1)
	seeds["bad_classes"] = edit(func(d map[string]any) { d["classes"] = []string{"only"} })
	seeds["bad_duplicate_key"] = bytes.Replace(good, []byte(`"version": 2,`), []byte(`"version": 2, "version": 2,`), 1)
	seeds["bad_nested"] = []byte(`{"format": ` + strings.Repeat("[", 64) + strings.Repeat("]", 64) + `}`)
	seeds["bad_not_object"] = []byte(`[1, 2, 3]`)
	seeds["bad_empty"] = nil
	return seeds
}

// TestFuzzModelCorpus keeps the committed corpus in step with fuzzSeeds:
// every seed is there byte for byte (rewrite with -update-fuzz-corpus), and
// each is under 20 KB.
func TestFuzzModelCorpus(t *testing.T) {
	dir := filepath.Join("testdata", "fuzz", "FuzzModel")
	seeds := fuzzSeeds(t)
	if *updateCorpus {
		require.NoError(t, os.MkdirAll(dir, 0o755))
		for name, b := range seeds {
			require.NoError(t, os.WriteFile(filepath.Join(dir, name), corpusFile(b), 0o644))
		}
	}
	for name, b := range seeds {
		got, err := os.ReadFile(filepath.Join(dir, name))
		require.NoError(t, err, "missing seed; run with -update-fuzz-corpus")
		assert.Equal(t, string(corpusFile(b)), string(got), "seed %s is stale; run with -update-fuzz-corpus", name)
		assert.Less(t, len(got), 20<<10, name)
		// The seeds mean what their names say.
		_, err = ReadModel(bytes.NewReader(b))
		if strings.HasPrefix(name, "valid_") {
			assert.NoError(t, err, name)
		} else {
			assert.True(t, err != nil && isReadError(err), "%s: %v", name, err)
		}
	}
}

// corpusFile encodes b in the corpus format of the go command's fuzzer
// (one []byte argument).
func corpusFile(b []byte) []byte {
	return []byte("go test fuzz v1\n[]byte(" + strconv.Quote(string(b)) + ")\n")
}

// FuzzModel checks, for any input, that ReadModel
//   - does not panic and ends (the input is at most what the fuzzer gives);
//   - rejects with an error wrapping one of ErrFormat, ErrVersion,
//     ErrChecksum, ErrTooLarge or ErrModel;
//   - accepts only a model that answers: on rows whose scaled values are 0
//     and ±1 its probabilities are finite, in [0, 1], and sum to 1 within
//     1e-12 for a softmax output (k roundings of numbers ≤ 1 each add at
//     most 2⁻⁵³, far below that); and that writes out and reads back with
//     bit-identical params.
func FuzzModel(f *testing.F) {
	for _, b := range fuzzSeeds(f) {
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		m, err := ReadModel(bytes.NewReader(b))
		if err != nil {
			if m != nil {
				t.Fatalf("a model together with the error %v", err)
			}
			if !isReadError(err) {
				t.Fatalf("error wraps no sentinel: %v", err)
			}
			return
		}
		checkAnswers(t, m)
		var buf bytes.Buffer
		if _, err := m.WriteTo(&buf); err != nil {
			t.Fatalf("WriteTo of an accepted model: %v", err)
		}
		back, err := ReadModel(&buf)
		if err != nil {
			t.Fatalf("reading back an accepted model: %v", err)
		}
		for i := range m.params {
			if math.Float64bits(m.params[i]) != math.Float64bits(back.params[i]) {
				t.Fatalf("param %d changed on a round trip", i)
			}
		}
	})
}

func isReadError(err error) bool {
	for _, s := range []error{ErrFormat, ErrVersion, ErrChecksum, ErrTooLarge, ErrModel} {
		if errors.Is(err, s) {
			return true
		}
	}
	return false
}

// checkAnswers predicts on rows that scale to 0, +1 and −1 in every feature
// (rows whose raw values overflow are skipped) and checks the probabilities.
func checkAnswers(t *testing.T, m *Model) {
	t.Helper()
	n := m.Inputs()
	x := make([]float64, n)
	for _, k := range []float64{0, 1, -1} {
		ok := true
		for j := range x {
			in := m.Encoder().Inputs()[j]
			x[j] = in.Mean + k*in.Scale
			ok = ok && !math.IsInf(x[j], 0)
		}
		if !ok {
			continue
		}
		p := m.Probabilities(nil, x)
		sum := 0.0
		for c, v := range p {
			if !(v >= 0 && v <= 1) {
				t.Fatalf("row scaled to %v: probability of class %d is %v", k, c, v)
			}
			sum += v
		}
		if !m.Multilabel() && math.Abs(sum-1) > 1e-12 {
			t.Fatalf("row scaled to %v: probabilities sum to %v", k, sum)
		}
		if c := m.Predict(x); c < 0 || c >= m.NumClasses() {
			t.Fatalf("Predict gave class %d of %d", c, m.NumClasses())
		}
	}
}

// A document of nested brackets is refused at a small depth, quickly and
// without memory that grows with the file. Before the depth bound, 20 MB of
// '[' after a key took 12 s and 3.7 GB of allocations in checkJSON.
func TestReadModelNestingBomb(t *testing.T) {
	const n = 8 << 20
	for _, head := range []string{`{"format": `, `{"params": {"data": `, `{"scaler": {"mean": `} {
		r := io.MultiReader(strings.NewReader(head), bytes.NewReader(bytes.Repeat([]byte("["), n)))
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		_, err := ReadModel(r)
		runtime.ReadMemStats(&after)
		require.ErrorIs(t, err, ErrFormat)
		assert.Contains(t, err.Error(), "nesting deeper than")
		// Reading the file whole allocates about 4n bytes in total (ReadAll
		// grows its buffer geometrically and each size counts); the scan
		// must add little to that. Unbounded, it allocated about 190n.
		alloc := after.TotalAlloc - before.TotalAlloc
		assert.Less(t, alloc, uint64(8*n), "allocated %d bytes for %d bytes of brackets", alloc, n)
	}
	// 32 levels deep inside a known key is still a format error, not a
	// refusal for depth: the bound sits above anything the format uses.
	doc := fmt.Sprintf(`{"classes": %s%s}`, strings.Repeat("[", 20), strings.Repeat("]", 20))
	_, err := ReadModel(strings.NewReader(doc))
	require.ErrorIs(t, err, ErrFormat)
	assert.NotContains(t, err.Error(), "nesting")
}

// endless is a reader of endless spaces that counts what it hands out.
type endless struct{ n int64 }

func (e *endless) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = ' '
	}
	e.n += int64(len(p))
	return len(p), nil
}

// The size limit holds for readers without an end and for files: a stream
// is cut one byte past the limit, and a file over the limit is refused from
// its size before it is read. Before the size check in Load, a 300 MB file
// was read to 256 MiB (about 600 MB of allocations) before it was refused.
func TestReadModelLimitStopsReading(t *testing.T) {
	r := &endless{}
	_, err := ReadModelLimit(r, 1<<20)
	require.ErrorIs(t, err, ErrTooLarge)
	// ReadAll asks for at least 512 bytes at a time: at most that much
	// past the limit is read.
	assert.LessOrEqual(t, r.n, int64(1<<20+1+512))

	path := filepath.Join(t.TempDir(), "huge.seine.json")
	f, err := os.Create(path)
	require.NoError(t, err)
	require.NoError(t, f.Truncate(DefaultMaxModelBytes+1)) // sparse: no disk used
	require.NoError(t, f.Close())
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	_, err = Load(path)
	runtime.ReadMemStats(&after)
	require.ErrorIs(t, err, ErrTooLarge)
	assert.Contains(t, err.Error(), path)
	assert.Less(t, after.TotalAlloc-before.TotalAlloc, uint64(1<<20), "bytes allocated to refuse the file")
	_, err = LoadFS(os.DirFS(filepath.Dir(path)), "huge.seine.json")
	require.ErrorIs(t, err, ErrTooLarge)
}

// Every single-digit change outside the params data is refused or leaves
// the answers alone. Before the digest covered the scaler, a changed digit
// of a scaler mean loaded silently and shifted every prediction.
func TestReadModelDigitChanges(t *testing.T) {
	good := fuzzSeeds(t)["valid_softmax"]
	m, err := ReadModel(bytes.NewReader(good))
	require.NoError(t, err)
	start := bytes.Index(good, []byte(`"data": "`))
	end := start + bytes.IndexByte(good[start+9:], '"') + 10
	var silent []string
	for i, c := range good {
		if c < '0' || c > '9' || (i >= start && i < end) {
			continue
		}
		b := bytes.Clone(good)
		b[i] = '0' + (c-'0'+1)%10
		got, err := ReadModel(bytes.NewReader(b))
		if err != nil {
			continue
		}
		for _, x := range rows() {
			p, q := m.Probabilities(nil, x), got.Probabilities(nil, x)
			if math.Abs(p[0]-q[0]) > 1e-9 || math.Abs(p[1]-q[1]) > 1e-9 {
				line := 1 + bytes.Count(good[:i], []byte{'\n'})
				silent = append(silent, fmt.Sprintf("line %d %q", line, bytes.TrimSpace(good[bytes.LastIndexByte(good[:i], '\n')+1:i+1])))
				break
			}
		}
	}
	if len(silent) > 0 {
		t.Errorf("%d single-digit changes outside the params load without error and change the predictions, e.g. %s", len(silent), silent[0])
	}
}
