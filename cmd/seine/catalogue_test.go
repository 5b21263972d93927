package main

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The bad-input catalogue: every file in testdata/bad at the repository
// root (see its README.md), and the large cases generated here, run through
// the built tool. Each case gives the exit status (0 for files a careful
// reader accepts, 1 for bad input) and the words of the message that place
// the problem (path, line and column, row, field). Nothing may panic, and a
// failed run must leave the output file the user had byte for byte.

var badDir = filepath.Join("..", "..", "testdata", "bad")

var (
	catOnce sync.Once
	catBin  string
	catErr  error
)

// catalogueBin returns the tool built by TestMain, or builds it once into
// its own folder when TestMain did not.
func catalogueBin(t *testing.T) string {
	t.Helper()
	if bin != "" {
		return bin
	}
	catOnce.Do(func() {
		dir, err := os.MkdirTemp("", "seine-catalogue-")
		if err != nil {
			catErr = err
			return
		}
		catBin = filepath.Join(dir, "seine")
		if out, err := exec.Command("go", "build", "-o", catBin, ".").CombinedOutput(); err != nil {
			catErr = fmt.Errorf("building seine: %v\n%s", err, out)
		}
	})
	require.NoError(t, catErr)
	return catBin
}

// catRun is one run of the tool: its status, its standard error and the
// peak resident memory of the process in bytes (0 where unknown).
type catRun struct {
	code   int
	stderr string
	maxRSS int64
}

// runCatalogue runs the tool with args; a run longer than limit is killed
// and fails the test (a hang on bad input is a bug).
func runCatalogue(t *testing.T, limit time.Duration, args ...string) catRun {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), limit)
	defer cancel()
	cmd := exec.CommandContext(ctx, catalogueBin(t), args...)
	var errb bytes.Buffer
	cmd.Stderr = &errb
	err := cmd.Run()
	require.NoError(t, ctx.Err(), "seine %s: still running after %v", strings.Join(args, " "), limit)
	r := catRun{stderr: errb.String()}
	if ee, ok := err.(*exec.ExitError); ok {
		r.code = ee.ExitCode()
	} else {
		require.NoError(t, err, "running seine")
	}
	if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok && runtime.GOOS == "linux" {
		r.maxRSS = ru.Maxrss << 10 // kilobytes on Linux
	}
	return r
}

// catCase is one row of the catalogue.
type catCase struct {
	name string
	cmd  string   // train, evaluate, predict or inspect
	file string   // the bad (or accepted) input
	args []string // more flags
	code int      // expected exit status
	want []string // words the message must hold; "{file}" is replaced by the input's path
}

// catArgs returns the command line of c, writing output (model or
// predictions) to out.
func catArgs(c catCase, out string) []string {
	spec, data, model := filepath.Join(badDir, "ok.yaml"), filepath.Join(badDir, "ok.csv"), filepath.Join(badDir, "model_good.seine.json")
	switch {
	case strings.HasSuffix(c.file, ".yaml"):
		spec = c.file
	case strings.HasSuffix(c.file, ".csv"):
		data = c.file
	default:
		model = c.file
	}
	var a []string
	switch c.cmd {
	case "train":
		a = []string{"train", "-spec", spec, "-data", data, "-out", out, "-quiet"}
	case "evaluate":
		a = []string{"evaluate", "-model", model, "-data", data}
	case "predict":
		a = []string{"predict", "-model", model, "-data", data, "-out", out}
	case "inspect":
		a = []string{"inspect", "-model", model}
	}
	return append(a, c.args...)
}

// checkCase runs c and checks its status, its message, that nothing
// panicked, and that a failed run left out as it was.
func checkCase(t *testing.T, c catCase, limit time.Duration) catRun {
	t.Helper()
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	// The user's earlier output: a good model for train, old predictions
	// for predict. A failed run must leave it untouched.
	before, err := os.ReadFile(filepath.Join(badDir, "model_good.seine.json"))
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(out, before, 0o644))
	r := runCatalogue(t, limit, catArgs(c, out)...)
	assert.Equal(t, c.code, r.code, "exit status; stderr:\n%s", r.stderr)
	for _, w := range c.want {
		w = strings.ReplaceAll(w, "{file}", c.file)
		assert.Contains(t, r.stderr, w, "message lacks %q", w)
	}
	assert.NotContains(t, r.stderr, "panic", "the tool panicked")
	assert.NotContains(t, r.stderr, "goroutine ", "the tool panicked")
	after, err := os.ReadFile(out)
	require.NoError(t, err, "the output file is gone")
	if r.code != 0 {
		assert.True(t, bytes.Equal(before, after), "a failed %s changed the output file the user had", c.cmd)
	}
	if r.code == 0 && c.cmd == "train" {
		assert.False(t, bytes.Equal(before, after), "a successful train did not write its model")
	}
	assert.LessOrEqual(t, r.maxRSS, int64(maxRSS), "peak resident memory %d MB, want under %d MB", r.maxRSS>>20, maxRSS>>20)
	return r
}

// maxRSS bounds the peak resident memory of every run. A bounded run of
// this tool on these inputs stays well under it (the figure also counts
// the pages of the test process that forked it, about 60 MB under -race);
// the generated inputs, read without their limits, would take from 100 MB
// (the long line held once) to gigabytes (the bomb's scan stack, measured
// at 3.7 GB for 20 MB before the depth limit).
const maxRSS = 150 << 20

func bad(name string) string { return filepath.Join(badDir, name) }

// TestCatalogue runs every committed case.
func TestCatalogue(t *testing.T) {
	cases := []catCase{
		// Specs: positions are "path:line:column: field:" (YAML lines and
		// columns, 1-based).
		{"spec syntax", "train", bad("spec_syntax.yaml"), nil, 1, []string{"{file}:3: syntax"}},
		{"spec tab indentation", "train", bad("spec_tab_indent.yaml"), nil, 1, []string{"{file}:4:1:", "tab"}},
		{"spec duplicate key", "train", bad("spec_duplicate_key.yaml"), nil, 1, []string{"{file}:6:1: inputs:", "duplicate", "line 2"}},
		{"spec unknown key", "train", bad("spec_unknown_key.yaml"), nil, 1, []string{"{file}:6:5: hidden[0].dropout:", "unknown key"}},
		{"spec wrong type", "train", bad("spec_wrong_type.yaml"), nil, 1, []string{"{file}:2:9: inputs:", "integer"}},
		{"spec huge units", "train", bad("spec_huge_units.yaml"), nil, 1, []string{"{file}:4:12: hidden[0].units:", "limit"}},
		{"spec negative units", "train", bad("spec_negative_units.yaml"), nil, 1, []string{"{file}:4:12: hidden[0].units:", "-3"}},
		{"spec zero units", "train", bad("spec_zero_units.yaml"), nil, 1, []string{"{file}:4:12: hidden[0].units:", "got 0"}},
		{"spec zero inputs", "train", bad("spec_zero_inputs.yaml"), nil, 1, []string{"{file}:2:9: inputs:", "got 0"}},
		{"spec unknown activation", "train", bad("spec_unknown_activation.yaml"), nil, 1, []string{"{file}:5:17: hidden[0].activation:", `"tanhh"`}},
		{"spec empty", "train", bad("spec_empty.yaml"), nil, 1, []string{"{file}: empty spec"}},
		// A spec that trains into divergence: the model the user had stays.
		{"spec diverges", "train", bad("spec_diverges.yaml"), nil, 1, []string{"diverged", "was not written"}},
		// Issue 13: a null value points at the value, not at 1:1; an alias
		// bomb is refused at the alias that passes the size limit.
		{"spec null inputs", "train", bad("spec_null_inputs.yaml"), nil, 1, []string{"{file}:3:9: inputs:", "no value"}},
		{"spec alias bomb", "train", bad("spec_alias_bomb.yaml"), nil, 1, []string{"{file}:11:20:", "aliases expand the spec"}},

		// CSV read as RFC 4180 says: a BOM is skipped, CRLF ends a record
		// like LF (RFC 4180 §2.1 uses CRLF), and a quoted field may hold
		// commas (§2.6). Positions are "line L (row R), column NAME".
		{"csv BOM", "train", bad("csv_bom.csv"), nil, 0, nil},
		{"csv CRLF", "train", bad("csv_crlf.csv"), nil, 0, nil},
		{"csv quoted commas", "train", bad("csv_quoted.csv"), nil, 0, nil},
		{"csv ragged", "train", bad("csv_ragged.csv"), nil, 1, []string{"{file}: line 6 (row 5)", "4 fields, expected 5"}},
		{"csv no header", "train", bad("csv_no_header.csv"), nil, 1, []string{"{file}: line 1", "header"}},
		{"csv empty", "train", bad("csv_empty.csv"), nil, 1, []string{"{file}: line 1", "empty"}},
		{"csv header only", "train", bad("csv_header_only.csv"), nil, 1, []string{"{file}: line 1", "only a header"}},
		{"csv not a number", "train", bad("csv_not_number.csv"), nil, 1, []string{"{file}: line 8 (row 7), column \"petal_length\"", `"long"`}},
		{"csv NaN", "train", bad("csv_nan.csv"), nil, 1, []string{"{file}: line 10 (row 9), column \"sepal_width\"", "finite"}},
		{"csv -Inf", "train", bad("csv_inf.csv"), nil, 1, []string{"{file}: line 12 (row 11), column \"petal_width\"", "finite"}},
		{"csv label absent", "train", bad("csv_no_label.csv"), []string{"-label", "species"}, 1, []string{"{file}: line 1, column \"species\"", "no label column"}},
		{"csv label absent, last column", "train", bad("csv_no_label.csv"), nil, 1, []string{"{file}: line 1", "3 feature columns, expected 4"}},
		{"csv unknown class", "train", bad("csv_unknown_class.csv"), nil, 1, []string{"{file}: line 5 (row 4), column \"species\"", `"setosa-ish"`}},
		// RFC 4180 §2.5: a field that starts with a quote ends at a quote.
		{"csv bare quote", "train", bad("csv_bare_quote.csv"), nil, 1, []string{"{file}: line 31 (row 3)", "starts on line 4", "RFC 4180"}},
		{"csv CR-only line ends", "train", bad("csv_cr_only.csv"), nil, 1, []string{"{file}: line 1", "carriage return (CR) alone"}},
		{"csv NaN, evaluate", "evaluate", bad("csv_nan.csv"), nil, 1, []string{"{file}: line 10 (row 9), column \"sepal_width\""}},
		{"csv NaN, predict", "predict", bad("csv_nan.csv"), nil, 1, []string{"{file}: line 10 (row 9), column \"sepal_width\""}},

		// Model files.
		{"model good, evaluate", "evaluate", bad("model_good.seine.json"), nil, 0, nil},
		{"model good, predict", "predict", bad("model_good.seine.json"), nil, 0, nil},
		{"model good, inspect", "inspect", bad("model_good.seine.json"), nil, 0, nil},
	}
	for _, f := range []struct{ file, want string }{
		{"model_flipped_byte.seine.json", "checksum"},
		{"model_count_lies.seine.json", "params count 28, the spec needs 27"},
		{"model_data_short.seine.json", "params data holds 208 bytes, count 27 needs 216"},
		{"model_future_version.seine.json", "version 2"},
		{"model_duplicate_key.seine.json", `duplicate key "version"`},
		// Issue 13: model files that contradict themselves, each sealed
		// with a recomputed checksum (made by nn's TestCatalogueModels).
		{"model_v2_future_version.seine.json", "file has version 3"},
		{"model_v2_case_keys.seine.json", `unknown key "CLASSES"`},
		{"model_v2_classes_disagree.seine.json", "output.classes"},
		{"model_v2_label_is_input.seine.json", `label column "petal_width" is also an input`},
		{"model_v2_encoder_disagrees.seine.json", "the encoder disagrees with the spec"},
		{"model_v2_negative_scale.seine.json", "scale > 0"},
		{"model_v2_overflow.seine.json", "overflow"},
	} {
		for _, cmd := range []string{"evaluate", "predict", "inspect"} {
			cases = append(cases, catCase{f.file + ", " + cmd, cmd, bad(f.file), nil, 1, []string{"{file}: ", f.want}})
		}
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			checkCase(t, c, time.Minute)
		})
	}
}

// TestCatalogueCommitted checks that every file in testdata/bad is a case
// of TestCatalogue or a companion file, and is listed in its README.
func TestCatalogueCommitted(t *testing.T) {
	src, err := os.ReadFile("catalogue_test.go")
	require.NoError(t, err)
	readme, err := os.ReadFile(filepath.Join(badDir, "README.md"))
	require.NoError(t, err)
	entries, err := os.ReadDir(badDir)
	require.NoError(t, err)
	for _, e := range entries {
		n := e.Name()
		if n == "README.md" {
			continue
		}
		assert.True(t, bytes.Contains(readme, []byte("`"+n+"`")), "%s is not listed in testdata/bad/README.md", n)
		if n != "ok.yaml" && n != "ok.csv" {
			assert.True(t, bytes.Contains(src, []byte(`"`+n+`"`)), "%s is not a case of the catalogue", n)
		}
	}
}

// Generated cases: too large to commit, each written to a temporary file
// and streamed, never held in memory whole. Besides status and message,
// each must end within a few seconds and, on Linux, peak below a resident
// size that shows the limit was checked before the data was stored.
func TestCatalogueGenerated(t *testing.T) {
	if testing.Short() {
		t.Skip("writes about 140 MB of temporary files")
	}
	dir := t.TempDir()
	gen := func(name string, write func(w *bufio.Writer)) string {
		path := filepath.Join(dir, name)
		f, err := os.Create(path)
		require.NoError(t, err)
		w := bufio.NewWriterSize(f, 1<<16)
		write(w)
		require.NoError(t, w.Flush())
		require.NoError(t, f.Close())
		return path
	}
	const mb = 1 << 20

	// A 10 MB spec: refused at the 1 MiB limit of spec.Limits.MaxBytes.
	bigSpec := gen("spec_10mb.yaml", func(w *bufio.Writer) {
		w.WriteString("version: 1\ninputs: 4\n")
		line := "# " + strings.Repeat("padding ", 12) + "\n"
		for n := 0; n < 10*mb; n += len(line) {
			w.WriteString(line)
		}
	})
	// 10⁵ columns: the header alone is 700 KB, under the line limit, and
	// is refused by CSVOptions.MaxColumns (10,000) before any column
	// storage is made.
	wide := gen("csv_100k_columns.csv", func(w *bufio.Writer) {
		for j := range 100_000 {
			if j > 0 {
				w.WriteByte(',')
			}
			fmt.Fprintf(w, "f%05d", j)
		}
		w.WriteString("\n1\n")
	})
	// 10⁶ columns: an 8 MB header, refused by the line limit before the
	// column count is known; either way the header is never stored whole.
	wider := gen("csv_1m_columns.csv", func(w *bufio.Writer) {
		for j := range 1_000_000 {
			if j > 0 {
				w.WriteByte(',')
			}
			fmt.Fprintf(w, "f%06d", j)
		}
		w.WriteString("\n1\n")
	})
	// A 100 MB line: refused once it passes CSVOptions.MaxLineBytes (1 MiB),
	// before the line is held in memory.
	long := gen("csv_100mb_line.csv", func(w *bufio.Writer) {
		w.WriteString("sepal_length,sepal_width,petal_length,petal_width,species\n")
		chunk := strings.Repeat("1234567.0,", mb/10)
		for range 100 {
			w.WriteString(chunk)
		}
		w.WriteString("setosa\n")
	})
	// A JSON bomb: 16 MB of nested arrays where the model's spec belongs.
	bomb := gen("model_bomb.seine.json", func(w *bufio.Writer) {
		w.WriteString(`{"format": "seine-model", "version": 1, "spec": `)
		chunk := strings.Repeat("[", mb)
		for range 16 {
			w.WriteString(chunk)
		}
	})

	cases := []catCase{
		{"spec 10 MB", "train", bigSpec, nil, 1, []string{"{file}: ", "larger than the limit of 1048576 bytes"}},
		{"csv 100k columns", "train", wide, nil, 1, []string{"{file}: line 1", "100000 columns", "10000"}},
		{"csv 1M columns", "train", wider, nil, 1, []string{"{file}: line 1", "longer than 1048576 bytes"}},
		{"csv 100 MB line", "train", long, nil, 1, []string{"{file}: line 2", "longer than 1048576 bytes"}},
		{"model JSON bomb, evaluate", "evaluate", bomb, nil, 1, []string{"{file}: ", "nesting deeper than"}},
		{"model JSON bomb, inspect", "inspect", bomb, nil, 1, []string{"{file}: ", "nesting deeper than"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := checkCase(t, c, 30*time.Second)
			t.Logf("peak resident memory %d MB", r.maxRSS/mb)
		})
	}

	// A good model cut at seeded random offsets: every cut is refused as
	// not a model file, by every command that reads models.
	good, err := os.ReadFile(bad("model_good.seine.json"))
	require.NoError(t, err)
	rng := rand.New(rand.NewPCG(4180, 8259))
	for k := range 6 {
		at := rng.IntN(len(good) - 1)
		if k == 0 {
			at = len(good) - 2 // just before the closing brace
		}
		path := filepath.Join(dir, fmt.Sprintf("model_cut_%d.seine.json", at))
		require.NoError(t, os.WriteFile(path, good[:at], 0o644))
		for _, cmd := range []string{"evaluate", "predict", "inspect"} {
			c := catCase{fmt.Sprintf("model cut at %d, %s", at, cmd), cmd, path, nil, 1, []string{"{file}: ", "not a seine model file"}}
			t.Run(c.name, func(t *testing.T) { checkCase(t, c, time.Minute) })
		}
	}
}
