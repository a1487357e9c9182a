package cases

import (
	"bufio"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The fuzz targets are seeded with f.Add from readable files under the
// repository's testdata/fuzz (see testdata/fuzz/README.md), from the value
// table of value_test.go, from the embedded examples and from testdata/bad.
// Failing inputs found by the fuzzer go to cases/testdata/fuzz/ as usual.

// fuzzUnits are the units ParseValue is called with.
var fuzzUnits = []string{"Ω", "S", "F", "H", "V", "A", "s", "Hz", "m", "K", "eV", "W", "V/K", "A/V²", "1/V", "V^0.5", "F/m²", "F/m", "", "%", "dB", "°"}

func unitIndex(u string) uint8 {
	for i, x := range fuzzUnits {
		if x == u {
			return uint8(i)
		}
	}
	return 0
}

func FuzzParseValue(f *testing.F) {
	for _, r := range valueTable {
		f.Add(r.in, unitIndex(r.unit))
	}
	file, err := os.Open(filepath.Join("..", "testdata", "fuzz", "FuzzParseValue.txt"))
	if err != nil {
		f.Fatal(err)
	}
	defer file.Close()
	sc := bufio.NewScanner(file)
	for sc.Scan() {
		unit, value, ok := strings.Cut(sc.Text(), "\t")
		if ok {
			f.Add(value, unitIndex(unit))
		}
	}
	f.Fuzz(func(t *testing.T, s string, u uint8) {
		unit := fuzzUnits[int(u)%len(fuzzUnits)]
		v, err := ParseValue(s, unit)
		if err == nil && (math.IsInf(v, 0) || math.IsNaN(v)) {
			t.Fatalf("ParseValue(%q, %q) = %v without an error", s, unit, v)
		}
		w, errInf := ParseValueInf(s, unit)
		switch {
		case errInf == nil && math.IsNaN(w):
			t.Fatalf("ParseValueInf(%q, %q) = NaN", s, unit)
		case err == nil && (errInf != nil || w != v):
			t.Fatalf("ParseValueInf(%q, %q) = %v, %v; ParseValue gave %v", s, unit, w, errInf, v)
		case errInf == nil && err != nil && !math.IsInf(w, 1):
			t.Fatalf("ParseValueInf(%q, %q) = %v accepted what ParseValue refused: %v", s, unit, w, err)
		}
	})
}

func FuzzDecode(f *testing.F) {
	for _, n := range Examples() {
		src, _ := ExampleSource(n)
		f.Add(src)
	}
	for _, pattern := range []string{"fuzz/FuzzDecode/*.toml", "bad/*.toml"} {
		files, _ := filepath.Glob(filepath.Join("..", "testdata", pattern))
		for _, file := range files {
			data, err := os.ReadFile(file)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(data)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 1<<16 {
			return
		}
		c, err := Parse("fuzz.toml", data)
		if err != nil {
			var errs Errors
			if !errors.As(err, &errs) || len(errs) == 0 {
				t.Fatalf("error %T %v is not a non-empty Errors", err, err)
			}
			for _, d := range errs {
				if d.Line < 1 || d.File != "fuzz.toml" || d.Warning || d.Message == "" {
					t.Fatalf("malformed diagnostic %+v", d)
				}
			}
			return
		}
		for _, p := range c.Parts {
			if len(p.Nodes) != len(Terminals(p.Kind)) {
				t.Fatalf("part %s: %d nodes for %s", p.Name, len(p.Nodes), p.Kind)
			}
			for _, n := range p.Nodes {
				if n == "" {
					t.Fatalf("part %s has an empty node", p.Name)
				}
			}
		}
		for _, d := range c.Warnings {
			if d.Line < 1 || !d.Warning {
				t.Fatalf("malformed warning %+v", d)
			}
		}
		// Parse has validated every variant: each must apply.
		for _, v := range c.Variants {
			if _, err := c.ApplyVariant(v.Name); err != nil {
				t.Fatalf("variant %s passed Parse but does not apply: %v", v.Name, err)
			}
		}
	})
}
