package dc

import (
	"reflect"
	"strings"
	"testing"

	"tangent/cases"
)

func port(name, plus, minus string) *cases.Port {
	return &cases.Port{Name: name, Plus: plus, Minus: minus}
}

// A common-emitter stage biased by a current mirror: the signal goes in at
// the base and out at the collector. Q1 is in the path; the mirror (Q2,
// Q3) only feeds the emitter node and is not (every path from the mirror
// back to the output would pass the emitter node twice). Found by hand
// from the definition in SignalPath.
func TestSignalPath(t *testing.T) {
	ms := map[string]*cases.Model{"n": model(cases.DeviceNPN, map[string]float64{"saturation_current": 1e-15})}
	c := build(ms,
		vsrc("VCC", "vcc", "gnd", 9),
		&cases.Part{Name: "VIN", Kind: cases.VoltageSource, Nodes: []string{"sig", "gnd"}, DC: 0, AC: 1},
		&cases.Part{Name: "CIN", Kind: cases.Capacitor, Nodes: []string{"sig", "base"}, Value: 1e-6},
		res("RB1", "vcc", "base", 47e3),
		res("RB2", "base", "gnd", 10e3),
		res("RC", "vcc", "col", 4.7e3),
		bjt("Q1", "n", "col", "base", "emit"),
		bjt("Q2", "n", "emit", "m", "gnd"),
		bjt("Q3", "n", "m", "m", "gnd"),
		res("RM", "vcc", "m", 10e3),
		&cases.Part{Name: "COUT", Kind: cases.Capacitor, Nodes: []string{"col", "out"}, Value: 1e-6},
		res("RL", "out", "gnd", 10e3))
	in, out := port("in", "sig", "gnd"), port("out", "out", "gnd")
	got := SignalPath(c, in, out)
	want := []string{"CIN", "Q1", "COUT"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("signal path %v, want %v", got, want)
	}
	// The path does not depend on the direction.
	if got := SignalPath(c, out, in); !reflect.DeepEqual(got, want) {
		t.Errorf("reverse signal path %v, want %v", got, want)
	}
}

func TestWarnings(t *testing.T) {
	ms := map[string]*cases.Model{
		"n":  model(cases.DeviceNPN, map[string]float64{"saturation_current": 1e-15, "max_power": 0.1}),
		"nm": model(cases.DeviceNMOS, map[string]float64{"threshold_voltage": 0.6, "process_transconductance": 100e-6, "width": 10e-6, "length": 1e-6}),
	}
	// Q1 with a 1 MΩ collector resistor saturates (base current 0.1 mA·β
	// would drop kilovolts): in the path from in to out, so warned.
	c := build(ms,
		vsrc("VCC", "vcc", "gnd", 9),
		&cases.Part{Name: "VIN", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}, DC: 0.8, AC: 1},
		res("RB", "in", "b", 1e3),
		res("RC", "vcc", "out", 1e6),
		bjt("Q1", "n", "out", "b", "gnd"),
		// M1 cut off (gate at ground) between out and out2.
		mos("M1", "nm", "out2", "gnd", "out", "gnd"),
		res("R2", "out2", "gnd", 1e3))
	c.Ports = []*cases.Port{{Name: "in", Source: "VIN", Plus: "in", Minus: "gnd"}, port("out", "out2", "gnd")}
	c.Transfers = []*cases.Transfer{{From: "in", To: "out", Kind: cases.VoltageGain}}
	op, err := Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	kinds := map[string]string{}
	for _, w := range op.Warnings() {
		kinds[w.Part] = w.Kind
	}
	if kinds["Q1"] != WarnSaturationInPath {
		t.Errorf("Q1 (%s): warnings %v, want %s", op.Part("Q1").Device.Region, kinds, WarnSaturationInPath)
	}
	if kinds["M1"] != WarnCutoffInPath {
		t.Errorf("M1 (%s): warnings %v, want %s", op.Part("M1").Device.Region, kinds, WarnCutoffInPath)
	}
}

func TestWarningsPowerAndELV(t *testing.T) {
	ms := map[string]*cases.Model{"d": model(cases.DeviceDiode, map[string]float64{"saturation_current": 1e-14, "max_power": 0.05})}
	// IEC 61140: 120 V ripple-free DC is the limit of extra-low voltage.
	tests := []struct {
		name  string
		parts []*cases.Part
		want  []string // warning kinds, in order
	}{
		{"mains-derived 230 V supply", []*cases.Part{vsrc("VHV", "hv", "gnd", 230), res("R", "hv", "gnd", 1e6)}, []string{WarnAboveELV}},
		{"120 V exactly is within the limit", []*cases.Part{vsrc("V", "a", "gnd", 120), res("R", "a", "gnd", 1e6)}, nil},
		{"±70 V rails span 140 V", []*cases.Part{vsrc("VP", "p", "gnd", 70), vsrc("VN", "n", "gnd", -70), res("R", "p", "n", 1e6)}, []string{WarnAboveELV}},
		{"diode over max_power", []*cases.Part{vsrc("V", "a", "gnd", 5), res("R", "a", "k", 10), diode("D1", "d", "k", "gnd")}, []string{WarnOverMaxPower}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			op, err := Solve(build(ms, tt.parts...))
			if err != nil {
				t.Fatal(err)
			}
			var got []string
			for _, w := range op.Warnings() {
				got = append(got, w.Kind)
				if w.Kind == WarnAboveELV && !strings.Contains(w.Message, "local codes and licensed practice") {
					t.Errorf("ELV warning without the caution: %s", w.Message)
				}
			}
			if !reflect.DeepEqual(got, tt.want) {
				t.Errorf("warnings %v, want %v", got, tt.want)
			}
		})
	}
}
