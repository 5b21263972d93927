package lint

import (
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// textMatch finds code that recognises an error by its text: a comparison
// or search on the result of Error(). Errors are recognised by type or
// sentinel (errors.Is, errors.As) everywhere (issue 14).
var textMatch = regexp.MustCompile(`(strings\.(Contains|HasPrefix|HasSuffix|Index|EqualFold)|\.(Find[A-Za-z]*|Match[A-Za-z]*))\([^)]*\.Error\(\)|\.Error\(\) *(==|!=)|strings\.(Contains|Index)\((msg|detail|text), `)

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
		for i, line := range strings.Split(string(b), "\n") {
			if textMatch.MatchString(line) {
				if _, ok := allowed[rel]; ok {
					continue
				}
				t.Errorf("%s:%d recognises an error by its text; use a sentinel or a typed error with errors.Is or errors.As:\n\t%s", rel, i+1, strings.TrimSpace(line))
				found++
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if found > 0 {
		t.Logf("%d places", found)
	}
}

// TestLintCatches keeps the pattern honest: each of these lines must match.
func TestLintCatches(t *testing.T) {
	for _, line := range []string{
		`if strings.Contains(err.Error(), "refusing") {`,
		`if err.Error() == "x" {`,
		`if i := strings.Index(detail, optim.ErrDiverged.Error()+": "); i >= 0 {`,
		`if strings.Contains(msg, "refusing to build a model") {`,
		`m := regexp.MustCompile("x").FindString(err.Error())`,
	} {
		if !textMatch.MatchString(line) {
			t.Errorf("not caught: %s", line)
		}
	}
	for _, line := range []string{`if errors.Is(err, ErrX) {`, `fmt.Fprintln(w, err.Error())`} {
		if textMatch.MatchString(line) {
			t.Errorf("caught, but fine: %s", line)
		}
	}
}
