package report

import (
	"bytes"
	"context"
	"html"
	"math"
	"math/rand/v2"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/diag"
	"github.com/seine-ml/seine/internal/chart"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
)

// hostile is a class name that would break the page if it were not
// escaped.
const hostile = `<script>alert("x")</script>&`

// fixture builds a small softmax model with random params, scores it on
// random rows and returns the page of it.
func fixture(t *testing.T) *Page {
	t.Helper()
	s, err := spec.Parse(strings.NewReader(`version: 1
name: tiny "net" <b>
inputs: [a, b]
hidden:
  - units: 3
    activation: tanh
output:
  classes: [red, green, "` + strings.ReplaceAll(hostile, `"`, `\"`) + `"]
`))
	require.NoError(t, err)
	net, err := nn.Compile(s)
	require.NoError(t, err)
	rng := rand.New(rand.NewPCG(1, 2))
	params := make([]float64, net.NumParams())
	for i := range params {
		params[i] = rng.NormFloat64()
	}
	m, err := nn.NewModel(s, params, nil, nil)
	require.NoError(t, err)
	const rows = 90
	x, y := mat.NewDense(rows, 2, nil), mat.NewDense(rows, 3, nil)
	for i := range rows {
		x.Set(i, 0, rng.NormFloat64())
		x.Set(i, 1, rng.NormFloat64())
		y.Set(i, i%3, 1)
	}
	var p mat.Dense
	m.ProbabilitiesBatch(&p, x)
	rep, err := score.Evaluate(&p, y, m.Classes(), score.Options{})
	require.NoError(t, err)
	set := &data.Set{X: x, Y: y, Classes: m.Classes(), Features: m.Features()}
	im, err := diag.PermutationImportance(context.Background(), m, set, diag.ImportanceOptions{Repeats: 3})
	require.NoError(t, err)
	rk := rep.Ranking.PerClass[0]
	return &Page{Model: m, ModelFile: "tiny.seine.json", Report: rep, Importance: im,
		Data:     Data{File: "rows.csv", Rows: rows, SHA256: strings.Repeat("ab", 32)},
		ROC:      &chart.ROCPlot{Title: "roc " + hostile, Curves: []chart.Series{{Name: hostile, X: rk.ROC.FPR, Y: rk.ROC.TPR}}},
		Cautions: []string{"first caution", "second " + hostile},
		Version:  "seine test"}
}

func render(t *testing.T, p *Page) string {
	t.Helper()
	var b bytes.Buffer
	require.NoError(t, Write(&b, p))
	return b.String()
}

// TestSelfContained: the page references nothing outside itself — no
// src, href, url(), @import or link element — and its only "http" texts
// are the SVG namespace names, which browsers never fetch (the
// Content-Security-Policy of default-src 'none' would block any load
// anyway; the browser test in cmd/seine checks the console).
func TestSelfContained(t *testing.T) {
	page := render(t, fixture(t))
	for _, bad := range []string{"src=", "href=", "url(", "@import", "<link", "<script", "<img", "<iframe"} {
		assert.NotContains(t, strings.ToLower(page), bad)
	}
	for _, m := range regexp.MustCompile(`[a-z:]*="?https?://[^"\s>]*`).FindAllString(page, -1) {
		assert.Regexp(t, `^xmlns(:xlink)?="http://www\.w3\.org/`, m)
	}
	assert.Contains(t, page, `content="default-src 'none'; style-src 'unsafe-inline'; img-src data:"`)
	assert.Contains(t, page, "@media print")
	assert.Contains(t, page, "size: A4")
	assert.NotContains(t, page, "<?xml", "SVG declarations stripped")
}

// TestEscaped: a class name, spec name and caution holding markup come
// out as text, in the HTML and in the SVG the charts draw.
func TestEscaped(t *testing.T) {
	page := render(t, fixture(t))
	assert.NotContains(t, page, hostile)
	assert.NotContains(t, page, "<script>")
	assert.Contains(t, page, "&lt;script&gt;alert(")
	assert.NotContains(t, page, "<b>")
}

var figureRE = regexp.MustCompile(`<(?:td|div|span)[^>]*data-figure="([^"]+)"[^>]*?(?: data-value="([^"]*)")?>([^<]*)<`)

// TestFigures: every figure of the report is in the page, as text formatted
// by Format and as a data-value that reads back to the same float64.
func TestFigures(t *testing.T) {
	p := fixture(t)
	page := render(t, p)
	r := p.Report
	head := map[string]*float64{"accuracy": &r.Accuracy, "cross-entropy": &r.CrossEntropy, "macro-f1": &r.MacroF1,
		"macro-roc-auc": r.MacroROCAUC, "macro-ap": r.MacroAveragePrecision, "ece": &r.ECE}
	for id, v := range head {
		re := regexp.MustCompile(`id="` + id + `" data-figure="([a-z0-9_]+)" data-value="([^"]+)">([^<]*)<`)
		m := re.FindStringSubmatch(page)
		require.NotNil(t, m, "figure %s", id)
		got, err := strconv.ParseFloat(m[2], 64)
		require.NoError(t, err)
		assert.Equal(t, *v, got, id)
		assert.Equal(t, Format(m[1], v), m[3], id)
	}
	for _, c := range r.PerClass {
		i := strings.Index(page, `<tr data-class="`+html.EscapeString(c.Name)+`"><td>`)
		require.GreaterOrEqual(t, i, 0, "row of %q", c.Name)
		row := page[i : i+strings.Index(page[i:], "</tr>")]
		found := map[string]string{}
		for _, m := range figureRE.FindAllStringSubmatch(row, -1) {
			found[m[1]] = m[2]
			if m[1] == "roc_auc" {
				assert.Equal(t, Format("roc_auc", c.ROCAUC), m[3])
			}
		}
		for key, want := range map[string]float64{"precision": c.Precision, "recall": c.Recall, "f1": c.F1, "roc_auc": *c.ROCAUC, "average_precision": *c.AveragePrecision, "rows": float64(c.Rows)} {
			got, err := strconv.ParseFloat(found[key], 64)
			require.NoError(t, err, "%s %s", c.Name, key)
			assert.Equal(t, want, got, "%s %s", c.Name, key)
		}
		assert.Empty(t, found["threshold"], "softmax classes have no threshold")
	}
	for i, row := range r.Confusion {
		for j, n := range row {
			assert.Contains(t, page, `data-true="`+html.EscapeString(r.Classes[i])+`" data-predicted="`+html.EscapeString(r.Classes[j])+`" data-value="`+strconv.Itoa(n)+`"`)
		}
	}
	for _, in := range p.Importance.Inputs {
		assert.Contains(t, page, `<tr data-input="`+in.Name+`">`)
		assert.Contains(t, page, `data-figure="rise_mean" data-value="`+strconv.FormatFloat(in.CrossEntropyRise.Mean, 'g', -1, 64)+`"`)
	}
	assert.Contains(t, page, `id="data-sha256">`+strings.Repeat("ab", 32))
	assert.Contains(t, page, "<p>first caution</p>")
	assert.Contains(t, page, "holds no training trace")
	assert.Contains(t, page, "softmax: each row is given its most probable class")
	assert.Contains(t, page, `id="roc-figure"><svg`)
	assert.Contains(t, page, "No precision–recall curve.")
}

// TestFormat: the page's number formats (accuracy as a percentage with
// two decimals, the rest with four, "–" for undefined).
func TestFormat(t *testing.T) {
	v := 0.97333
	assert.Equal(t, "97.33%", Format("accuracy", &v))
	assert.Equal(t, "0.9733", Format("roc_auc", &v))
	assert.Equal(t, "–", Format("roc_auc", nil))
	nan := math.NaN()
	assert.Equal(t, "–", Format("ece", &nan))
}

// TestWriteErrors: a page without a model or report is an error, not a
// panic.
func TestWriteErrors(t *testing.T) {
	var b bytes.Buffer
	assert.ErrorIs(t, Write(&b, &Page{}), ErrPage)
	p := fixture(t)
	p.Report.Ranking = nil
	assert.ErrorIs(t, Write(&b, p), ErrPage)
}

// TestNiceTicks: axis values are round steps (1, 2 or 5 × 10ⁿ) covering
// the range, with 0 exactly 0.
func TestNiceTicks(t *testing.T) {
	got := niceTicks(-0.02, 0.31)
	require.NotEmpty(t, got)
	assert.Contains(t, got, 0.0)
	for _, v := range got {
		assert.GreaterOrEqual(t, v, -0.02)
		assert.LessOrEqual(t, v, 0.31+1e-12)
	}
	assert.LessOrEqual(t, len(got), 7)
	assert.GreaterOrEqual(t, len(got), 3)
	assert.InDelta(t, 0.1, got[2]-got[1], 1e-12, "step 0.1 for a span of 0.33")
}
