package main

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"tangent/cases"
)

var updateGolden = flag.Bool("update", false, "rewrite the golden outputs in testdata/golden")

// goldenRuns are the command lines whose text output is kept in
// testdata/golden, per embedded example: what an engineer reads, so that
// a change to it is seen in review. Numbers are printed to four or five
// significant digits, so the files do not depend on the last bits of a
// solution.
var goldenRuns = [][]string{
	{"check"},
	{"bias"},
	{"linearize"},
	{"transfer"},
	{"explain"},
	{"compare"},
}

// TestGoldenOutputs compares the text output of every subcommand on every
// embedded example with the files in testdata/golden (regenerate with
// go test ./cmd/tangent -run TestGoldenOutputs -update, then read the
// diff). The files are a record of the output, not a reference for its
// numbers: those are checked against closed forms and libraries in the
// packages' own tests. They double as the check that the same input
// gives byte-identical output.
func TestGoldenOutputs(t *testing.T) {
	if runtime.GOARCH != "amd64" {
		// Other targets may fuse multiply-adds (the Go spec allows it),
		// which can move a printed last digit.
		t.Skip("golden outputs recorded on amd64")
	}
	dir := filepath.Join("..", "..", "testdata", "golden")
	for _, ex := range cases.Examples() {
		for _, args := range goldenRuns {
			name := ex + "_" + strings.Join(args, "_") + ".txt"
			t.Run(name, func(t *testing.T) {
				full := append(append([]string(nil), args[0], "example:"+ex), args[1:]...)
				code, out, errOut := runArgs(full...)
				if code != exitOK {
					t.Fatalf("%v: exit %d: %s", full, code, errOut)
				}
				path := filepath.Join(dir, name)
				if *updateGolden {
					if err := os.MkdirAll(dir, 0o755); err != nil {
						t.Fatal(err)
					}
					if err := os.WriteFile(path, []byte(out), 0o644); err != nil {
						t.Fatal(err)
					}
					return
				}
				want, err := os.ReadFile(path)
				if err != nil {
					t.Fatalf("%v (run with -update to create it)", err)
				}
				if !bytes.Equal([]byte(out), want) {
					t.Errorf("%v: output differs from %s (run with -update and read the diff):\n%s", full, path, firstDifference(string(want), out))
				}
			})
		}
	}
}

// firstDifference shows the first line where got departs from want.
func firstDifference(want, got string) string {
	wl, gl := strings.Split(want, "\n"), strings.Split(got, "\n")
	for i := 0; i < len(wl) || i < len(gl); i++ {
		var w, g string
		if i < len(wl) {
			w = wl[i]
		}
		if i < len(gl) {
			g = gl[i]
		}
		if w != g {
			return "line " + strconv.Itoa(i+1) + ":\n  want " + w + "\n  got  " + g
		}
	}
	return "(no line differs: line endings?)"
}
