package main

import (
	"context"
	"encoding/json"
	"html"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/internal/report"
)

var (
	rareSpec = filepath.Join("..", "..", "examples", "rare", "takeover.yaml")
	rareData = filepath.Join("..", "..", "examples", "rare", "signins.csv")
)

func TestReportUsage(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "r.html")
	for _, tt := range []struct {
		name string
		args []string
		code int
		want string
	}{
		{"no model", []string{"report", "-data", "d.csv", "-out", out}, 2, "-model is required"},
		{"no data", []string{"report", "-model", "m", "-out", out}, 2, "-data is required"},
		{"no out", []string{"report", "-model", "m", "-data", "d"}, 2, "-out is required"},
		{"repeats", []string{"report", "-model", "m", "-data", "d", "-out", out, "-repeats", "0"}, 2, "-repeats 0"},
		{"threshold", []string{"report", "-model", "m", "-data", "d", "-out", out, "-threshold", "1.5"}, 2, "-threshold 1.5"},
		{"overwrite model", []string{"report", "-model", baseModel, "-data", triageData, "-out", baseModel}, 2, "refusing to overwrite"},
		{"missing model", []string{"report", "-model", filepath.Join(dir, "none.json"), "-data", triageData, "-out", out}, 1, "none.json"},
		{"threshold on softmax", []string{"report", "-model", baseModel, "-data", triageData, "-out", out, "-threshold", "0.3"}, 2, "softmax"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			r := runIn(tt.args...)
			assert.Equal(t, tt.code, r.code, r.stderr)
			assert.Contains(t, r.stderr, tt.want)
			_, err := os.Stat(out)
			assert.True(t, os.IsNotExist(err), "nothing written")
		})
	}
	r := runIn("help", "report")
	assert.Equal(t, 0, r.code)
	assert.Contains(t, r.stdout, "Usage: seine report")
	assert.Contains(t, r.stdout, "Breiman 2001")
	assert.Contains(t, r.stdout, "affect")
}

// TestReportSoftmax: the report of the triage model (softmax, five classes)
// is written, holds every class's row and the confusion matrix, and says
// the model takes the most probable class.
func TestReportSoftmax(t *testing.T) {
	out := filepath.Join(t.TempDir(), "triage.html")
	r := seine(t, "report", "-model", baseModel, "-data", triageData, "-out", out, "-repeats", "2")
	require.Equal(t, 0, r.code, r.stderr)
	b, err := os.ReadFile(out)
	require.NoError(t, err)
	page := string(b)
	for _, c := range []string{"human", "crawler", "scraper", "stuffer", "monitor"} {
		assert.Contains(t, page, `<tr data-class="`+c+`"><td>`)
		assert.Contains(t, page, `data-true="`+c+`"`)
	}
	assert.Contains(t, page, "most probable class")
	assert.Contains(t, page, `<tr data-input="agent_family">`)
	assert.Contains(t, r.stderr, "wrote "+out)
}

// chromiumPath is where Debian's chromium package puts the browser.
const chromiumPath = "/usr/bin/chromium"

// needChromium skips the test where Chromium is absent, unless
// SEINE_REQUIRE_CHROMIUM=1 (as CI sets it), where it fails instead.
func needChromium(t *testing.T) {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		require.NotEqual(t, "1", os.Getenv("SEINE_REQUIRE_CHROMIUM"), "SEINE_REQUIRE_CHROMIUM=1 but %s is missing: %v", chromiumPath, err)
		t.Skipf("browser test skipped: %s not found (install Debian's chromium package, as .ci/run does, to run it)", chromiumPath)
	}
}

// chromium runs headless Chromium on the file page with extra arguments,
// from a fresh profile, and returns its standard output and standard error.
func chromium(t *testing.T, page string, extra ...string) (stdout, stderr string) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	args := append([]string{"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync", "--disable-dev-shm-usage",
		"--user-data-dir=" + t.TempDir(), "--enable-logging=stderr", "--v=0"}, extra...)
	abs, err := filepath.Abs(page)
	require.NoError(t, err)
	args = append(args, "file://"+abs)
	cmd := exec.CommandContext(ctx, chromiumPath, args...)
	cmd.WaitDelay = 10 * time.Second
	var out, errb strings.Builder
	cmd.Stdout, cmd.Stderr = &out, &errb
	err = cmd.Run()
	require.NoError(t, err, "chromium: %s", errb.String())
	return out.String(), errb.String()
}

// consoleRE finds the page's console messages in Chromium's log: lines
// such as `[...:INFO:CONSOLE:0] "Loading the image ... violates the
// following Content Security Policy directive ...", source: file:///...`.
// The page runs no script, so it should log nothing at all: every console
// message, whatever its level (a refused load, a parse problem), counts as
// an error.
var consoleRE = regexp.MustCompile(`(?m)^\[[^\]]*:CONSOLE[^\]]*\] .*$`)

func consoleErrors(log string) []string {
	return consoleRE.FindAllString(log, -1)
}

// domFigure finds an element carrying data-figure and data-value in the DOM
// that Chromium serialised, with its text.
var domFigure = regexp.MustCompile(`<(?:td|div|span)[^>]*?(?: id="([^"]*)")? data-figure="([^"]+)"(?: data-value="([^"]*)")?>([^<]*)<`)

// TestReportBrowser renders the report of a model trained here (the rare
// example: a sigmoid output with an operating threshold, a temperature, a
// category input) in headless Chromium and checks that the page loads
// without console errors, that the DOM holds the figures of `evaluate
// -json` on the same model and data, written as the page writes them, and
// that a screenshot is made. The check of the console is itself checked on
// a page that breaks the page's own rule (it loads an image).
func TestReportBrowser(t *testing.T) {
	needChromium(t)
	dir := t.TempDir()
	model := filepath.Join(dir, "takeover.seine.json")
	r := seine(t, "train", "-spec", rareSpec, "-data", rareData, "-out", model, "-holdout", "0.25",
		"-threshold-rule", "recall:0.8", "-calibrate", "-iterations", "120", "-quiet")
	require.Equal(t, 0, r.code, r.stderr)
	page := filepath.Join(dir, "report.html")
	r = seine(t, "report", "-model", model, "-data", rareData, "-out", page, "-repeats", "3")
	require.Equal(t, 0, r.code, r.stderr)
	r = seine(t, "evaluate", "-model", model, "-data", rareData, "-json")
	require.Equal(t, 0, r.code, r.stderr)
	var ev struct {
		Accuracy              float64  `json:"accuracy"`
		CrossEntropy          float64  `json:"cross_entropy"`
		MacroF1               float64  `json:"macro_f1"`
		MacroROCAUC           *float64 `json:"macro_roc_auc"`
		MacroAveragePrecision *float64 `json:"macro_average_precision"`
		ECE                   float64  `json:"ece"`
		PerClass              []struct {
			Class            string   `json:"class"`
			Precision        float64  `json:"precision"`
			Recall           float64  `json:"recall"`
			F1               float64  `json:"f1"`
			ROCAUC           *float64 `json:"roc_auc"`
			AveragePrecision *float64 `json:"average_precision"`
			Threshold        *float64 `json:"threshold"`
		} `json:"per_class"`
	}
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &ev))

	dom, log := chromium(t, page, "--dump-dom")
	assert.Empty(t, consoleErrors(log), "console errors loading the report")
	require.Contains(t, dom, `id="model-name"`, "the DOM holds the page")

	// The headline figures, by id.
	byID := map[string][]string{}
	for _, m := range domFigure.FindAllStringSubmatch(dom, -1) {
		if m[1] != "" {
			byID[m[1]] = m
		}
	}
	for id, v := range map[string]*float64{"accuracy": &ev.Accuracy, "cross-entropy": &ev.CrossEntropy, "macro-f1": &ev.MacroF1,
		"macro-roc-auc": ev.MacroROCAUC, "macro-ap": ev.MacroAveragePrecision, "ece": &ev.ECE} {
		m := byID[id]
		require.NotNil(t, m, "no element id=%q with a figure in the DOM", id)
		assert.Equal(t, report.Format(m[2], v), html.UnescapeString(m[4]), id)
		got, err := strconv.ParseFloat(m[3], 64)
		require.NoError(t, err, id)
		assert.Equal(t, *v, got, "%s: data-value", id)
	}
	// Each class's row.
	for _, c := range ev.PerClass {
		i := strings.Index(dom, `<tr data-class="`+c.Class+`"><td>`)
		require.GreaterOrEqual(t, i, 0, "row of class %q", c.Class)
		row := dom[i : i+strings.Index(dom[i:], "</tr>")]
		found := map[string][]string{}
		for _, m := range domFigure.FindAllStringSubmatch(row, -1) {
			found[m[2]] = m
		}
		for key, v := range map[string]*float64{"precision": &c.Precision, "recall": &c.Recall, "f1": &c.F1,
			"roc_auc": c.ROCAUC, "average_precision": c.AveragePrecision, "threshold": c.Threshold} {
			m := found[key]
			require.NotNil(t, m, "class %q: no %s", c.Class, key)
			assert.Equal(t, report.Format(key, v), html.UnescapeString(m[4]), "class %q %s", c.Class, key)
		}
	}
	assert.NotNil(t, ev.PerClass[1].Threshold, "the rare class has the operating threshold")
	assert.Contains(t, dom, `<tr data-input="channel">`, "importance of the category input")

	shotDir := os.Getenv("SEINE_SCREENSHOT_DIR")
	if shotDir == "" {
		shotDir = dir
	}
	shot := filepath.Join(shotDir, "report.png")
	_, log = chromium(t, page, "--screenshot="+shot, "--window-size=1280,3600", "--hide-scrollbars")
	assert.Empty(t, consoleErrors(log))
	f, err := os.Open(shot)
	require.NoError(t, err)
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	require.NoError(t, err)
	assert.Equal(t, 1280, cfg.Width)
	t.Logf("screenshot of the report: %s", shot)

	// The console check finds a load that the page's policy refuses.
	broken := filepath.Join(dir, "broken.html")
	b, err := os.ReadFile(page)
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(broken, []byte(strings.Replace(string(b), "</main>", `<img alt="" src="https://example.invalid/x.png"></main>`, 1)), 0o644))
	_, log = chromium(t, broken, "--dump-dom")
	assert.NotEmpty(t, consoleErrors(log), "a refused load shows as a console error; log:\n%s", log)
}
