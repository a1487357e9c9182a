package cases

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// badExpectation is one "# expect: LINE: TEXT" header line of a file in
// testdata/bad: some diagnostic must be on LINE and contain TEXT.
type badExpectation struct {
	line int
	text string
}

// readBadCases reads the malformed case files of the repository's
// testdata/bad and their expectations.
func readBadCases(t *testing.T) map[string][]badExpectation {
	t.Helper()
	files, err := filepath.Glob(filepath.Join("..", "testdata", "bad", "*.toml"))
	if err != nil || len(files) < 25 {
		t.Fatalf("want at least 25 files in testdata/bad, found %d (%v)", len(files), err)
	}
	out := map[string][]badExpectation{}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		for _, l := range strings.Split(string(data), "\n") {
			rest, ok := strings.CutPrefix(l, "# expect: ")
			if !ok {
				continue
			}
			n, text, _ := strings.Cut(rest, ": ")
			line, err := strconv.Atoi(n)
			if err != nil {
				t.Fatalf("%s: bad expect line %q", f, l)
			}
			out[f] = append(out[f], badExpectation{line, text})
		}
		if len(out[f]) == 0 {
			t.Fatalf("%s: no '# expect: LINE: TEXT' header", f)
		}
	}
	return out
}

// TestBadCases runs every malformed case through Parse and checks that each
// expected diagnostic is reported at its line, and nothing is accepted.
func TestBadCases(t *testing.T) {
	for file, exps := range readBadCases(t) {
		t.Run(filepath.Base(file), func(t *testing.T) {
			c, err := Load(file)
			if err == nil {
				t.Fatalf("accepted: %+v", c)
			}
			errs, ok := err.(Errors)
			if !ok {
				t.Fatalf("error is %T, want Errors: %v", err, err)
			}
			for _, d := range errs {
				if d.Line < 1 || d.File != file || d.Warning {
					t.Errorf("malformed diagnostic %+v", d)
				}
			}
			for _, e := range exps {
				found := false
				for _, d := range errs {
					if d.Line == e.line && strings.Contains(d.Error(), e.text) {
						found = true
					}
				}
				if !found {
					t.Errorf("want a diagnostic at line %d containing %q; got:\n%v", e.line, e.text, err)
				}
			}
		})
	}
}
