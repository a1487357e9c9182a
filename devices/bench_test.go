package devices

import "testing"

// Evaluating a device allocates nothing (issue 3); the benchmarks report
// ns/op and allocs/op, and TestNoAllocations enforces the zero.

func BenchmarkDiodeCurrent(b *testing.B) {
	d := NewDiode(map[string]float64{"saturation_current": 1e-14, "breakdown_voltage": 5.1}, 1, 300.15)
	b.ReportAllocs()
	v := 0.0
	for b.Loop() {
		v += 1e-9
		d.Current(0.65 + v)
	}
}

func BenchmarkBJTEval(b *testing.B) {
	q := NewBJT(KindPNP, earlyModel, 1, 300.15)
	b.ReportAllocs()
	v := 0.0
	for b.Loop() {
		v += 1e-9
		q.Eval(-0.65-v, 3)
	}
}

func BenchmarkMOSFETEval(b *testing.B) {
	m := NewMOSFET(KindNMOS, nmosModel, 0, 0, 1, 300.15)
	b.ReportAllocs()
	v := 0.0
	for b.Loop() {
		v += 1e-9
		m.Eval(1.5+v, 2, -1)
	}
}

func BenchmarkCapacitances(b *testing.B) {
	d := NewDiode(map[string]float64{"saturation_current": 1e-14, "junction_capacitance": 1e-12}, 1, 300.15)
	q := NewBJT(KindNPN, earlyModel, 1, 300.15)
	m := NewMOSFET(KindNMOS, nmosModel, 0, 0, 1, 300.15)
	s := q.Eval(0.65, -3)
	b.ReportAllocs()
	v := 0.0
	for b.Loop() {
		v += 1e-9
		d.Capacitance(-1-v, 1e-3)
		q.Capacitances(0.65, -3-v, s)
		m.Capacitances(1.5, 2+v, -1)
	}
}

func TestNoAllocations(t *testing.T) {
	d := NewDiode(map[string]float64{"saturation_current": 1e-14, "breakdown_voltage": 5.1}, 1, 300.15)
	q := NewBJT(KindPNP, earlyModel, 1, 300.15)
	m := NewMOSFET(KindNMOS, nmosModel, 0, 0, 1, 300.15)
	var sink float64
	allocs := testing.AllocsPerRun(100, func() {
		i, g := d.Current(0.65)
		cj, cd := d.Capacitance(0.65, g)
		v, _ := d.LimitStep(2, 0.6)
		s := q.Eval(-0.65, 2)
		cbe, cbc := q.Capacitances(-0.65, 2, s)
		a, c, _ := q.LimitStep(-2, -0.6, 2, 2)
		ms := m.Eval(1.5, -2, -1)
		cgs, cgd, cgb := m.Capacitances(1.5, -2, -1)
		e, f, _ := m.LimitStep(5, 1, 3, 2)
		sink += i + cj + cd + v + s.Ic + cbe + cbc + a + c + ms.Id + cgs + cgd + cgb + e + f
		sink += float64(len(d.Region(-5)) + len(q.Region(-0.65, 2)))
	})
	if allocs != 0 {
		t.Errorf("device evaluation allocates %g times per run", allocs)
	}
	_ = sink
}
