package cases

import (
	"testing"

	"github.com/BurntSushi/toml"
)

// TestScanLines checks the key-line scan on TOML that tries to fool it:
// strings holding brackets and "key =", multi-line strings and arrays,
// quoted and dotted keys, inline tables and arrays of tables.
func TestScanLines(t *testing.T) {
	src := `# comment [not.a.table]
title = """
[parts.fake]
kind = "resistor"
"""
temperature = '27 °C' # [x]
[parts."R 1"]
kind = "resistor"   # a = "b"
  a . b = 'x'
[parts.R2]
"quoted\u0041key" = 1
list = [
  1,
  { start = "1 Hz",
    stop = 2 },
]
[[transfer]]
from = "in"
[[transfer]]
sweep = { start = "1 Hz", stop = "1 kHz", points_per_decade = 3 }
[transfer.extra]
x = 1
[variants.v]
parts.R1.value = "2k"
`
	// The scan is only ever run on text TOML accepts.
	var tree map[string]any
	if _, err := toml.Decode(src, &tree); err != nil {
		t.Fatalf("test input is not TOML: %v", err)
	}
	lines := scanLines(src)
	for _, r := range []struct {
		p    path
		line int
	}{
		{path{"title"}, 2},
		{path{"temperature"}, 6},
		{path{"parts"}, 7},
		{path{"parts", "R 1"}, 7},
		{path{"parts", "R 1", "kind"}, 8},
		{path{"parts", "R 1", "a", "b"}, 9},
		{path{"parts", "R2", "quotedAkey"}, 11},
		{path{"parts", "R2", "list", idx(1)}, 14},
		{path{"parts", "R2", "list", idx(1), "stop"}, 15},
		{path{"transfer", idx(0)}, 17},
		{path{"transfer", idx(0), "from"}, 18},
		{path{"transfer", idx(1)}, 19},
		{path{"transfer", idx(1), "sweep", "stop"}, 20},
		{path{"transfer", idx(1), "extra", "x"}, 22},
		{path{"variants", "v", "parts", "R1", "value"}, 24},
	} {
		if got := lines[r.p.key()]; got != r.line {
			t.Errorf("%s: line %d, want %d", r.p, got, r.line)
		}
	}
	if _, ok := lines[path{"parts", "fake"}.key()]; ok {
		t.Error("a table header inside a multi-line string was taken for a table")
	}
	if got := (path{"transfer", idx(1), "sweep", "start"}).String(); got != "transfer[2].sweep.start" {
		t.Errorf("path.String() = %q", got)
	}
	if got := (path{"parts", "R 1", "a"}).String(); got != `parts."R 1".a` {
		t.Errorf("path.String() = %q", got)
	}
}

// TestScanLinesGarbage checks that the scan ends on text that is not TOML.
func TestScanLinesGarbage(t *testing.T) {
	for _, s := range []string{"", "[", "[[", "a", "a =", `a = "`, `a = """`, "a = [", "a = {", "= = =", "\"\\", "[a.\"b", "a = [{x = [1,"} {
		scanLines(s)
	}
}
