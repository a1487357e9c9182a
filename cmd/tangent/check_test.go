package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

func runArgs(args ...string) (code int, stdout, stderr string) {
	var o, e bytes.Buffer
	code = run(args, &o, &e)
	return code, o.String(), e.String()
}

func TestCheckDefaultExample(t *testing.T) {
	code, out, errOut := runArgs("check")
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	for _, want := range []string{"example:ce_amplifier: valid case", "12: 2 voltage_source, 6 resistor, 3 capacitor, 1 bjt", "bw_npn (npn)", "in → out", "1 Hz to 1 GHz", "no_early"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
}

func TestCheckJSON(t *testing.T) {
	code, out, _ := runArgs("check", "--json", "example:cs_mirror")
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	var s checkSummary
	if err := json.Unmarshal([]byte(out), &s); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if !s.Valid || s.File != "example:cs_mirror" || s.PartsByKind["mosfet"] != 3 || len(s.Models) != 2 || len(s.Variants) != 2 || s.TemperatureK != 300.15 {
		t.Errorf("summary = %+v", s)
	}
	if s.Transfers[0].Sweep == nil || s.Transfers[0].Sweep.StopHz != 1e9 {
		t.Errorf("transfer = %+v", s.Transfers[0])
	}
}

// TestCheckBadFiles runs every malformed case of testdata/bad through the
// command: exit status 2, and each expected file:line on stderr.
func TestCheckBadFiles(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join("..", "..", "testdata", "bad", "*.toml"))
	if len(files) < 25 {
		t.Fatalf("%d files in testdata/bad, want at least 25", len(files))
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		code, out, errOut := runArgs("check", f)
		if code != exitUsage || out != "" {
			t.Errorf("%s: exit %d, stdout %q; want 2 and nothing", f, code, out)
		}
		n := 0
		for _, l := range strings.Split(string(data), "\n") {
			rest, ok := strings.CutPrefix(l, "# expect: ")
			if !ok {
				continue
			}
			n++
			line, text, _ := strings.Cut(rest, ": ")
			if _, err := strconv.Atoi(line); err != nil {
				t.Fatalf("%s: bad header %q", f, l)
			}
			if want := f + ":" + line + ": "; !strings.Contains(errOut, want) || !strings.Contains(errOut, text) {
				t.Errorf("%s: stderr lacks %q … %q:\n%s", f, want, text, errOut)
			}
		}
		if n == 0 {
			t.Errorf("%s: no expectations", f)
		}
	}
}

func TestCheckBadJSON(t *testing.T) {
	f := filepath.Join("..", "..", "testdata", "bad", "many_errors.toml")
	code, out, _ := runArgs("check", f, "--json")
	var s checkSummary
	if err := json.Unmarshal([]byte(out), &s); err != nil || code != exitUsage {
		t.Fatalf("exit %d, %v\n%s", code, err, out)
	}
	if s.Valid || len(s.Errors) != 5 || s.Errors[0].Line != 7 || s.Errors[0].Key != "temperature" {
		t.Errorf("summary = %+v", s)
	}
}

func TestCheckUsageErrors(t *testing.T) {
	for _, args := range [][]string{
		{"check", "--no-such-flag"},
		{"check", "a.toml", "b.toml"},
		{"check", "no/such/file.toml"},
		{"examples", "no_such_example"},
		{"examples", "--force"},
	} {
		if code, _, errOut := runArgs(args...); code != exitUsage || errOut == "" {
			t.Errorf("%v: exit %d, stderr %q; want 2 and a message", args, code, errOut)
		}
	}
	if code, _, errOut := runArgs("check", "--help"); code != exitOK || !strings.Contains(errOut, "usage: tangent check") {
		t.Errorf("--help: exit %d, %q", code, errOut)
	}
}

func TestExamples(t *testing.T) {
	code, out, _ := runArgs("examples")
	if code != exitOK || !strings.Contains(out, "ce_amplifier") || !strings.Contains(out, "(default)") || strings.Count(out, "\n") < 4 {
		t.Fatalf("exit %d:\n%s", code, out)
	}
	dir := filepath.Join(t.TempDir(), "ex")
	if code, out, errOut := runArgs("examples", "--write", dir); code != exitOK {
		t.Fatalf("--write: exit %d %s %s", code, out, errOut)
	}
	written, _ := filepath.Glob(filepath.Join(dir, "*.toml"))
	if len(written) < 4 {
		t.Fatalf("wrote %v", written)
	}
	for _, f := range written {
		if code, _, errOut := runArgs("check", f); code != exitOK {
			t.Errorf("check %s: exit %d %s", f, code, errOut)
		}
	}
	if code, _, errOut := runArgs("examples", "--write", dir); code != exitUsage || !strings.Contains(errOut, "--force") {
		t.Errorf("second --write without --force: exit %d %q", code, errOut)
	}
	if code, _, _ := runArgs("examples", "--write", dir, "--force", "sallen_key"); code != exitOK {
		t.Errorf("--force: exit %d", code)
	}
	code, out, _ = runArgs("examples", "--json")
	var list struct{ Examples []exampleEntry }
	if err := json.Unmarshal([]byte(out), &list); err != nil || code != exitOK || len(list.Examples) < 4 {
		t.Errorf("--json: exit %d %v %s", code, err, out)
	}
}

func TestSIString(t *testing.T) {
	for _, r := range []struct {
		v    float64
		unit string
		want string
	}{
		{1e9, "Hz", "1 GHz"}, {4700, "Ω", "4.7 kΩ"}, {0.1, "Hz", "100 mHz"}, {1, "Hz", "1 Hz"},
		{2.2e-9, "F", "2.2 nF"}, {0, "V", "0 V"}, {-1.5e-3, "A", "-1.5 mA"}, {123456, "Hz", "123.5 kHz"},
	} {
		if got := siString(r.v, r.unit); got != r.want {
			t.Errorf("siString(%g, %q) = %q, want %q", r.v, r.unit, got, r.want)
		}
	}
}
