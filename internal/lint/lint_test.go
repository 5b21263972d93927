package lint

import (
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// textMatch finds code that recognises an error by its text: a comparison,
// search or rewrite of the result of Error() (or of a variable holding it,
// by the names the tree used: msg, detail, text). Indenting a message's
// lines for display is not recognition, and is allowed. Errors are recognised by type or
// sentinel (errors.Is, errors.As) everywhere (issue 14).
var textMatch = regexp.MustCompile(`(strings\.(Contains|HasPrefix|HasSuffix|Index|EqualFold|Cut|CutPrefix|TrimPrefix)|\.(Find[A-Za-z]*|Match[A-Za-z]*))\([^)]*\.Error\(\)|\.Error\(\) *(==|!=)|strings\.(Contains|Index)\((msg|detail|text), |strings\.(Replace|ReplaceAll|Cut|CutPrefix|TrimPrefix)\((msg|detail), `)

// allowed lists the files that may read an error's text, with why.
var allowed = map[string]string{
	// yaml.v3 reports a syntax error's line only in its message ("yaml:
	// line 3: ..."): the spec parser reads the position from it.
	"spec/parse.go": "yaml.v3 gives syntax positions as text only",
}

// TestNoErrorText walks every non-test Go file of the module and fails on
// any recognition of an error by its text outside the allowed files.
func TestNoErrorText(t *testing.T) {
	root := filepath.Join("..", "..")
	found := 0
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && (d.Name() == ".git" || d.Name() == "testdata" || d.Name() == "node_modules") {
			return filepath.SkipDir
		}
		if d.IsDir() || !strings.HasSuffix(path, ".go") || strings.HasSuffix(path, "_test.go") {
			return nil
		}
		rel, _ := filepath.Rel(root, path)
		rel = filepath.ToSlash(rel)
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		if _, ok := allowed[rel]; ok {
			return nil
		}
		for i, line := range strings.Split(string(b), "\n") {
			if !assert.False(t, textMatch.MatchString(line), "%s:%d recognises an error by its text; use a sentinel or a typed error with errors.Is or errors.As:\n\t%s", rel, i+1, strings.TrimSpace(line)) {
				found++
			}
		}
		return nil
	})
	require.NoError(t, err)
	if found > 0 {
		t.Logf("%d places", found)
	}
}

// TestLintCatches keeps the pattern honest: each of these lines must match.
func TestLintCatches(t *testing.T) {
	tests := []struct {
		name   string
		line   string
		caught bool
	}{
		{"strings.Contains on Error()", `if strings.Contains(err.Error(), "refusing") {`, true},
		{"Error() compared", `if err.Error() == "x" {`, true},
		{"strings.Index on detail", `if i := strings.Index(detail, optim.ErrDiverged.Error()+": "); i >= 0 {`, true},
		{"strings.Contains on msg", `if strings.Contains(msg, "refusing to build a model") {`, true},
		{"regexp on Error()", `m := regexp.MustCompile("x").FindString(err.Error())`, true},
		{"rewrite of msg", `msg = strings.ReplaceAll(msg, fmt.Sprintf("part %d ", i), paths[i]+" ")`, true},
		{"cut of Error()", `_, rest, ok := strings.Cut(err.Error(), ": ")`, true},
		{"errors.Is", `if errors.Is(err, ErrX) {`, false},
		{"indenting for display", `return strings.ReplaceAll(strings.TrimRight(err.Error(), "\n"), "\n", "\n  ")`, false},
		{"Error() printed", `fmt.Fprintln(w, err.Error())`, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if tt.caught {
				assert.True(t, textMatch.MatchString(tt.line), "not caught: %s", tt.line)
			} else {
				assert.False(t, textMatch.MatchString(tt.line), "caught, but fine: %s", tt.line)
			}
		})
	}
}
