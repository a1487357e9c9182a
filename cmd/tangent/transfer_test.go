package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// DESIGN.md's JSON contract for "transfer --json".
func TestTransferJSON(t *testing.T) {
	code, out, errs := runArgs("transfer", "example:sallen_key", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Transfers []map[string]json.RawMessage `json:"transfers"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Transfers) != 2 {
		t.Fatalf("%d transfers, want the file's 2", len(doc.Transfers))
	}
	tr := doc.Transfers[0]
	for _, k := range []string{"from", "to", "kind", "order", "dc_gain", "poles", "zeros", "cancelled",
		"numerator", "denominator", "bandwidth_hz", "f_high_hz", "f_low_hz", "response"} {
		if _, ok := tr[k]; !ok {
			t.Errorf("transfer has no %q", k)
		}
	}
	var poles []struct{ Re, Im float64 }
	json.Unmarshal(tr["poles"], &poles)
	// Unity-gain Sallen-Key: ω0² = 1/(R1R2C1C2) (any active-filter text,
	// from memory); the example's product of poles must equal it, with
	// R1 = R2 = 10 kΩ, C1 = 22 nF, C2 = 10 nF, up to the follower's
	// 1/A = 1e-5 error (A = 100 dB).
	if len(poles) != 2 {
		t.Fatalf("poles %v", poles)
	}
	w0sq := poles[0].Re*poles[1].Re - poles[0].Im*poles[1].Im
	if want := 1 / (10e3 * 10e3 * 22e-9 * 10e-9); math.Abs(w0sq-want) > 1e-4*want {
		t.Errorf("ω0² = %g, want %g", w0sq, want)
	}
	var dc float64
	json.Unmarshal(tr["dc_gain"], &dc)
	if math.Abs(dc-1) > 1e-4 { // follower with 100 dB of loop gain: 1 − 1e-5
		t.Errorf("dc_gain %g, want ≈ 1", dc)
	}
	// input impedance has a pole at the origin: dc_gain null.
	if string(doc.Transfers[1]["dc_gain"]) != "null" {
		t.Errorf("input impedance dc_gain = %s, want null", doc.Transfers[1]["dc_gain"])
	}
}

func TestTransferFlags(t *testing.T) {
	dir := t.TempDir()
	csvFile := filepath.Join(dir, "r.csv")
	code, out, errs := runArgs("transfer", "--from", "in", "--to", "out", "--kind", "voltage", "--sweep", "10Hz:1MHz:5", "--csv", csvFile, "--response")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "response") {
		t.Errorf("no response table:\n%s", out)
	}
	data, err := os.ReadFile(csvFile)
	if err != nil {
		t.Fatal(err)
	}
	if lines := strings.Count(string(data), "\n"); lines != 1+26 { // header + 5 decades · 5 + 1
		t.Errorf("csv has %d lines", lines)
	}
	for _, bad := range [][]string{
		{"transfer", "--kind", "gain", "--from", "in", "--to", "out"},
		{"transfer", "--from", "in"},
		{"transfer", "--from", "nope", "--to", "out"},
		{"transfer", "--sweep", "1GHz:10Hz:5"},
		{"transfer", "--two-port", "in"},
		{"transfer", "--no-such-flag"},
	} {
		if code, _, errs := runArgs(bad...); code != exitUsage || errs == "" {
			t.Errorf("%v: exit %d, stderr %q; want 2 and a message", bad, code, errs)
		}
	}
}

func TestTransferTwoPort(t *testing.T) {
	code, out, errs := runArgs("transfer", "example:sallen_key", "--two-port", "in,out", "--at", "1kHz")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, k := range []string{"Two-port in,out at 1.000 kHz", "  z ", "  y ", "  abcd"} {
		if !strings.Contains(out, k) {
			t.Errorf("no %q in\n%s", k, out)
		}
	}
}

func TestTransferPlots(t *testing.T) {
	dir := t.TempDir()
	code, _, errs := runArgs("transfer", "example:sallen_key", "--plots", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, f := range []string{"01_in-out_voltage_bode.svg", "01_in-out_voltage_poles.svg", "02_in-out_input_impedance_bode.svg"} {
		data, err := os.ReadFile(filepath.Join(dir, f))
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(data), "<svg") {
			t.Errorf("%s is not an SVG", f)
		}
		if info, _ := os.Stat(filepath.Join(dir, f)); info.Mode().Perm() != 0o644 {
			t.Errorf("%s has mode %v, want 0644", f, info.Mode().Perm())
		}
	}
}
