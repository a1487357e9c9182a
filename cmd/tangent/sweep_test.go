package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// sweepDoc is the JSON of "tangent bias --sweep --json".
type sweepDoc struct {
	File  string `json:"file"`
	Sweep struct {
		Part   string    `json:"part"`
		Kind   string    `json:"kind"`
		Unit   string    `json:"unit"`
		Scale  string    `json:"scale"`
		Values []float64 `json:"values"`
	} `json:"sweep"`
	Points []json.RawMessage `json:"points"`
}

// sameJSON reports where two decoded JSON values differ: numbers beyond
// rel relative (with abs as a floor), anything else not equal. Keys in
// skip are not compared.
func sameJSON(path string, a, b any, rel, abs float64, skip map[string]bool) []string {
	switch x := a.(type) {
	case map[string]any:
		y, ok := b.(map[string]any)
		if !ok || len(x) != len(y) {
			return []string{fmt.Sprintf("%s: %v vs %v", path, a, b)}
		}
		var out []string
		for k, v := range x {
			if !skip[k] {
				out = append(out, sameJSON(path+"."+k, v, y[k], rel, abs, skip)...)
			}
		}
		return out
	case []any:
		y, ok := b.([]any)
		if !ok || len(x) != len(y) {
			return []string{fmt.Sprintf("%s: %v vs %v", path, a, b)}
		}
		var out []string
		for i := range x {
			out = append(out, sameJSON(fmt.Sprintf("%s[%d]", path, i), x[i], y[i], rel, abs, skip)...)
		}
		return out
	case float64:
		y, ok := b.(float64)
		if !ok || math.Abs(x-y) > max(rel*max(math.Abs(x), math.Abs(y)), abs) {
			return []string{fmt.Sprintf("%s: %v vs %v", path, a, b)}
		}
		return nil
	}
	if a != b {
		return []string{fmt.Sprintf("%s: %v vs %v", path, a, b)}
	}
	return nil
}

// A sweep point is the operating point of the circuit with the source at
// that value: each JSON point of a sweep of the default example's supply
// equals what "tangent bias --json --set parts.VCC.dc=V" prints (the
// definition of a DC sweep, common practice), also with another --set.
// The sweep starts each point from the one before, a fresh solve from
// zero, so the iteration counts differ and the numbers agree to the
// solver's convergence, far below 1e-9 relative.
func TestBiasSweepMatchesBias(t *testing.T) {
	for _, extra := range [][]string{nil, {"--set", "parts.RE.value=2k2"}} {
		args := append([]string{"bias", "--sweep", "VCC=0:12V:13", "--json"}, extra...)
		code, out, errOut := runArgs(args...)
		if code != exitOK || errOut != "" {
			t.Fatalf("%v: exit %d, stderr %q", args, code, errOut)
		}
		var doc sweepDoc
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatalf("%v: %v\n%s", args, err, out)
		}
		s := doc.Sweep
		if doc.File != "example:ce_amplifier" || s.Part != "VCC" || s.Kind != "voltage_source" || s.Unit != "V" || s.Scale != "linear" {
			t.Errorf("%v: head %+v", args, doc)
		}
		if len(s.Values) != 13 || len(doc.Points) != 13 {
			t.Fatalf("%v: %d values, %d points, want 13", args, len(s.Values), len(doc.Points))
		}
		for i, v := range s.Values {
			if want := float64(i); math.Abs(v-want) > 1e-15*12 { // 0, 1, …, 12 V
				t.Errorf("%v: value %d = %g V, want %g V", args, i, v, want)
			}
		}
		for _, i := range []int{3, 8, 12} {
			set := "parts.VCC.dc=" + strconv.FormatFloat(s.Values[i], 'g', -1, 64)
			code, ref, errOut := runArgs(append([]string{"bias", "--json", "--set", set}, extra...)...)
			if code != exitOK {
				t.Fatalf("bias --set %s: exit %d: %s", set, code, errOut)
			}
			var a, b any
			json.Unmarshal(doc.Points[i], &a)
			json.Unmarshal([]byte(ref), &b)
			// 1e-9 relative; 1e-18 absolute for the few fA-level
			// leakage currents of a junction near zero bias.
			for _, d := range sameJSON("point", a, b, 1e-9, 1e-18, map[string]bool{"iterations": true, "method": true}) {
				t.Errorf("%v, VCC = %g V: sweep vs bias: %s", extra, s.Values[i], d)
			}
		}
	}

	// The text table has one row per point.
	code, out, _ := runArgs("bias", "--sweep", "VCC=0:12V:13")
	if code != exitOK {
		t.Fatalf("text: exit %d", code)
	}
	lines := strings.Split(out, "\n")
	rows := 0
	for i, l := range lines {
		if strings.HasPrefix(l, "Node voltages and device currents") {
			for _, r := range lines[i+2:] {
				if strings.TrimSpace(r) == "" {
					break
				}
				rows++
			}
		}
	}
	if rows != 13 || !strings.Contains(out, "VCC (voltage source) swept from 0 V to 12 V, 13 points") {
		t.Errorf("text table has %d rows, want 13:\n%s", rows, out)
	}
}

// A current source swept over seven decades into an ideal diode: the
// junction voltage is Shockley's law inverted, V = VT·ln(1 + I/Is), exact
// for the ideal diode (W. Shockley, Bell Syst. Tech. J. 28, 1949; from memory), with
// VT = k·T/q at 300.15 K from the exact k and q of the SI Brochure, 9th
// ed. The diode carries the source's current (KCL) and the values are
// spaced by a constant ratio, 10^(7/28).
func TestBiasSweepDiodeLog(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "diode_iv.toml")
	err := os.WriteFile(file, []byte(`# Brightwater Instruments: a level-gauge clamp diode on the bench.
title = "Clamp diode I-V"
temperature = "27 °C"

[models.bw_clamp]
device = "diode"
saturation_current = "10 fA"

[parts.IB]
kind = "current_source"
from = "gnd"
to = "a"
dc = "1 mA"

[parts.D1]
kind = "diode"
model = "bw_clamp"
anode = "a"
cathode = "gnd"
`), 0o644)
	if err != nil {
		t.Fatal(err)
	}
	csvFile := filepath.Join(dir, "iv.csv")
	code, out, errOut := runArgs("bias", file, "--sweep", "IB=1nA:10mA:29", "--log", "--csv", csvFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "D1: forward throughout") || !strings.Contains(out, "log spacing") {
		t.Errorf("text report:\n%s", out)
	}
	f, err := os.Open(csvFile)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got, want := strings.Join(recs[0], ","), "IB (A),V(a) (V),I(D1) (A),D1 region"; got != want {
		t.Fatalf("header %q, want %q", got, want)
	}
	if len(recs) != 1+29 {
		t.Fatalf("%d rows, want 29", len(recs)-1)
	}
	const (
		k  = 1.380649e-23    // J/K, exact (SI Brochure, 9th ed.)
		q  = 1.602176634e-19 // C, exact (SI Brochure, 9th ed.)
		is = 10e-15
	)
	vt := k * 300.15 / q
	ratio := math.Pow(10, 7.0/28)
	prev := 0.0
	for _, r := range recs[1:] {
		var x [3]float64
		for j := range x {
			if x[j], err = strconv.ParseFloat(r[j], 64); err != nil {
				t.Fatalf("row %v: %v", r, err)
			}
		}
		i, v, id := x[0], x[1], x[2]
		if want := vt * math.Log1p(i/is); math.Abs(v-want) > 1e-9*want {
			t.Errorf("I = %g A: V = %.12g V, Shockley gives %.12g V", i, v, want)
		}
		if math.Abs(id-i) > 1e-9*i {
			t.Errorf("I = %g A: I(D1) = %g A", i, id)
		}
		if prev > 0 && math.Abs(i/prev-ratio) > 1e-12*ratio {
			t.Errorf("ratio of values %g, want %g", i/prev, ratio)
		}
		if r[3] != "forward" {
			t.Errorf("I = %g A: region %q", i, r[3])
		}
		prev = i
	}
	if first, last := recs[1][0], recs[len(recs)-1][0]; first != "1e-09" || last != "0.01" {
		t.Errorf("end points %s, %s; want exactly 1e-09 and 0.01", first, last)
	}
}

// Region changes along a sweep, up and down. The default example's supply
// from 0 V: with no supply every junction sits at 0 V and the transistor
// is off (common practice); the example's hand bias at 12 V is forward
// active, and its divider already puts 1 V·10k/66k ≈ 0.15 V on the base
// at 1 V, past the VT·ln 2 cut-off border of the bjt's region rule (devices.BJT.Region).
// The emitter-coupled Schmitt trigger of testdata/dc/starved_solver.toml
// (given iterations) has two states inside its hysteresis band (its hand
// analysis; common practice for a Schmitt trigger): at 2 V in, the sweep
// up still has Q2 on, the sweep down has it off.
func TestBiasSweepRegions(t *testing.T) {
	schmitt := filepath.Join("..", "..", "testdata", "dc", "starved_solver.toml")
	tests := []struct {
		args  []string
		want  []string
		avoid []string
	}{
		{[]string{"bias", "--sweep", "VCC=0:12V:13"}, []string{"Q1: cutoff → forward active between 0 V and 1 V\n"}, []string{"saturation"}},
		{[]string{"bias", "--sweep", "VCC=12:0V:13"}, []string{"Q1: forward active → cutoff between 1 V and 0 V\n"}, nil},
		{[]string{"bias", "--sweep", "VCC=6:12V:4"}, []string{"Q1: forward active throughout\n"}, nil},
		{[]string{"bias", schmitt, "--set", "solver.max_iterations=100", "--sweep", "VIN=1.5:3V:31"},
			[]string{"Q2: forward active → cutoff between 2.", "Q1: forward active → saturation between 2."}, nil},
		{[]string{"bias", schmitt, "--set", "solver.max_iterations=100", "--sweep", "VIN=3:1.5V:31"},
			[]string{"Q2: cutoff → forward active between 1.", "Q1: saturation → forward active between 2."}, nil},
	}
	for _, tt := range tests {
		code, out, errOut := runArgs(tt.args...)
		if code != exitOK {
			t.Fatalf("%v: exit %d: %s", tt.args, code, errOut)
		}
		regions := out[strings.Index(out, "\nRegions\n"):]
		for _, w := range tt.want {
			if !strings.Contains(regions, w) {
				t.Errorf("%v: no %q in\n%s", tt.args, w, regions)
			}
		}
		for _, w := range tt.avoid {
			if strings.Contains(regions, w) {
				t.Errorf("%v: unexpected %q in\n%s", tt.args, w, regions)
			}
		}
	}
	// At 2 V in, the two sweeps end in different states.
	region := func(dir string) string {
		csvFile := filepath.Join(t.TempDir(), "s.csv")
		code, _, errOut := runArgs("bias", schmitt, "--set", "solver.max_iterations=100", "--sweep", "VIN="+dir, "--csv", csvFile)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", dir, code, errOut)
		}
		data, _ := os.ReadFile(csvFile)
		for _, l := range strings.Split(string(data), "\n") {
			if strings.HasPrefix(l, "2,") {
				return l[strings.LastIndex(l, ",")+1:] // Q2 region, the last column
			}
		}
		t.Fatalf("%s: no row at 2 V:\n%s", dir, data)
		return ""
	}
	if up, down := region("1.5:3V:31"), region("3:1.5V:31"); up != "forward_active" || down != "cutoff" {
		t.Errorf("Q2 at 2 V: %s sweeping up, %s sweeping down; want forward_active and cutoff", up, down)
	}
}

// A supply swept past 120 V, the ripple-free DC limit of extra-low
// voltage (IEC 61140), gets bias's caution once, for the highest value.
func TestBiasSweepELV(t *testing.T) {
	code, out, errOut := runArgs("bias", "--sweep", "VCC=0:200V:5")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	flat := strings.Join(strings.Fields(out), " ")
	for _, want := range []string{"at 2 of 5 points, VCC from 150 V to 200 V: VCC supplies 200 V DC",
		"120 V ripple-free DC limit", "local codes and licensed practice"} {
		if !strings.Contains(flat, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	if n := strings.Count(flat, "IEC 61140"); n != 1 {
		t.Errorf("caution printed %d times, want once:\n%s", n, out)
	}
}

// Bad --sweep, --log and --csv flags: exit 2, a message naming the flag,
// nothing on stdout. A sweep that does not converge: exit 1, and with
// --json the failure report of bias plus the sweep.
func TestBiasSweepBadFlags(t *testing.T) {
	tests := []struct {
		args []string
		msg  string
	}{
		{[]string{"--sweep", "VIN"}, "want PART=START:STOP:POINTS"},
		{[]string{"--sweep", "VIN=0:1"}, "want PART=START:STOP:POINTS"},
		{[]string{"--sweep", "VIN=0:1:1"}, "POINTS from 2"},
		{[]string{"--sweep", "VIN=0:1:10002"}, "POINTS from 2"},
		{[]string{"--sweep", "VIN=0:1:five"}, "want PART=START:STOP:POINTS"},
		{[]string{"--sweep", "NOPE=0:1:5"}, `no part named "NOPE"`},
		{[]string{"--sweep", "RC=0:1:5"}, "RC is a resistor; want an independent source"},
		{[]string{"example:diode_thermometer", "--sweep", "R1=0:1:5"}, "R1 is a resistor"},
		{[]string{"--sweep", "VIN=0:1mA:5"}, `STOP: "1mA": unit "mA" does not fit`},
		{[]string{"--sweep", "VIN=1V:1V:5"}, "START and STOP are equal"},
		{[]string{"--sweep", "VIN=0:1V:5", "--log"}, "nonzero and of the same sign"},
		{[]string{"--sweep", "VIN=-1V:1V:5", "--log"}, "nonzero and of the same sign"},
		{[]string{"--log"}, "go with --sweep"},
		{[]string{"--csv", "x.csv"}, "go with --sweep"},
	}
	for _, tt := range tests {
		args := append([]string{"bias"}, tt.args...)
		code, out, errOut := runArgs(args...)
		if code != exitUsage || out != "" || !strings.Contains(errOut, "--sweep") || !strings.Contains(errOut, tt.msg) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want exit 2 and %q", args, code, out, errOut, tt.msg)
		}
	}

	starved := filepath.Join("..", "..", "testdata", "dc", "starved_solver.toml")
	code, out, errOut := runArgs("bias", starved, "--sweep", "VIN=0:3V:4", "--json")
	if code != exitAnalysis || !strings.Contains(errOut, "sweep of VIN at 0 V") {
		t.Fatalf("exit %d, stderr %q; want 1", code, errOut)
	}
	var doc struct {
		Converged bool     `json:"converged"`
		FailedAt  *float64 `json:"failed_at"`
		Sweep     struct {
			Values []float64 `json:"values"`
		} `json:"sweep"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || doc.Converged || len(doc.Sweep.Values) != 4 ||
		doc.FailedAt == nil || *doc.FailedAt != 0 {
		t.Errorf("failure JSON (%v):\n%s", err, out)
	}
}
