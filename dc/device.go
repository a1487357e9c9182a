package dc

import (
	"fmt"
	"math"

	"tangent/cases"
	"tangent/devices"
	"tangent/internal/sparse"
)

// maxTerminals is the largest terminal count of a device (mosfet).
const maxTerminals = 4

// device is one nonlinear part as the Newton iteration sees it: terminal
// currents I_t (into terminal t) and their derivatives ∂I_t/∂V_u with
// respect to the terminal voltages, evaluated at the controlling voltages
// v (diode: v; bjt: vbe, vbc; mosfet: vgs, vds, vbs) after junction
// limiting. Every array is fixed-size, so evaluation allocates nothing.
type device struct {
	part *cases.Part
	kind cases.Kind
	nt   int               // terminal count
	term [maxTerminals]int // unknown index of each terminal, −1 ground

	// The device's parameters (one is set), shared by the devices of
	// parts with the same model and scaling; never modified.
	diode *devices.Diode
	bjt   *devices.BJT
	mos   *devices.MOSFET

	v       [3]float64 // controlling voltages of the last evaluation
	limited bool       // the last evaluation used a limited step

	cur [maxTerminals]float64               // I_t, A
	jac [maxTerminals][maxTerminals]float64 // ∂I_t/∂V_u, S
	ve  [maxTerminals]float64               // terminal voltages consistent with v
	slt [maxTerminals][maxTerminals]int32   // matrix slot of (term[t], term[u]), −1 none
	row [maxTerminals]bool                  // terminal t carries current

	// Evaluated states, kept for the result.
	di, dg float64 // diode current and conductance
	bs     devices.BJTState
	ms     devices.MOSState
}

// modelKey identifies the inputs of a device constructor: the model and
// the part's own scaling. Parts with equal keys get equal device
// parameters, so each distinct key is built once per circuit.
type modelKey struct {
	model                       *cases.Model
	kind                        cases.Kind
	area, width, length, factor float64
}

// newDevice builds into d the device of part p with its model from c, at
// the given temperature (K). Its terminals are attached later (attach).
// built holds the devices already built for other parts, by modelKey: a
// device whose key is there shares their parameters instead of reading
// the model's keys again.
func newDevice(d *device, c *cases.Circuit, p *cases.Part, temperature float64, built *deviceCache) error {
	m := built.model(c, p.Model)
	if m == nil {
		return fmt.Errorf("dc: part %s: model %q is not defined", p.Name, p.Model)
	}
	*d = device{part: p, kind: p.Kind}
	area := p.Area
	if area == 0 {
		area = 1
	}
	key := modelKey{model: m, kind: p.Kind, area: area}
	switch p.Kind {
	case cases.Diode:
		if m.Device != cases.DeviceDiode {
			return fmt.Errorf("dc: part %s: model %q is a %s model, a diode needs a diode model", p.Name, m.Name, m.Device)
		}
		d.nt = 2
		d.row = [maxTerminals]bool{true, true}
		if b := built.get(key); b != nil {
			d.diode = b.diode
		} else {
			dd := devices.NewDiode(m.Params, area, temperature)
			d.diode = &dd
			built.put(key, d)
		}
	case cases.BJT:
		if m.Device != cases.DeviceNPN && m.Device != cases.DevicePNP {
			return fmt.Errorf("dc: part %s: model %q is a %s model, a bjt needs an npn or pnp model", p.Name, m.Name, m.Device)
		}
		d.nt = 3
		d.row = [maxTerminals]bool{true, true, true}
		if b := built.get(key); b != nil {
			d.bjt = b.bjt
		} else {
			q := devices.NewBJT(m.Device, m.Params, area, temperature)
			d.bjt = &q
			built.put(key, d)
		}
	case cases.MOSFET:
		if m.Device != cases.DeviceNMOS && m.Device != cases.DevicePMOS {
			return fmt.Errorf("dc: part %s: model %q is a %s model, a mosfet needs an nmos or pmos model", p.Name, m.Name, m.Device)
		}
		mult := p.Multiplier
		if mult == 0 {
			mult = 1
		}
		d.nt = 4
		d.row = [maxTerminals]bool{true, false, true, false} // drain, source
		key = modelKey{model: m, kind: p.Kind, width: p.Width, length: p.Length, factor: mult}
		if b := built.get(key); b != nil {
			d.mos = b.mos
		} else {
			mf := devices.NewMOSFET(m.Device, m.Params, p.Width, p.Length, mult, temperature)
			d.mos = &mf
			built.put(key, d)
		}
	default:
		return fmt.Errorf("dc: part %s: %s is not a device", p.Name, p.Kind)
	}
	return nil
}

// deviceCache remembers the devices built for each modelKey, and the
// model last looked up. Parts in a row usually share their model and
// scaling, so the last entry is tried before the map, which is made only
// when a second key appears.
type deviceCache struct {
	lastKey   modelKey
	lastDev   *device
	byKey     map[modelKey]*device
	lastName  string
	lastModel *cases.Model
}

// model returns c's model of the given name, nil when there is none.
func (b *deviceCache) model(c *cases.Circuit, name string) *cases.Model {
	if b.lastModel != nil && name == b.lastName {
		return b.lastModel
	}
	m := c.Models[name]
	if m != nil {
		b.lastName, b.lastModel = name, m
	}
	return m
}

// get returns the device built for key, or nil.
func (b *deviceCache) get(key modelKey) *device {
	if b.lastDev != nil && key == b.lastKey {
		return b.lastDev
	}
	if d := b.byKey[key]; d != nil {
		b.lastKey, b.lastDev = key, d
		return d
	}
	return nil
}

// put records d as the device built for key.
func (b *deviceCache) put(key modelKey, d *device) {
	if b.lastDev != nil {
		if b.byKey == nil {
			b.byKey = map[modelKey]*device{b.lastKey: b.lastDev}
		}
		b.byKey[key] = d
	}
	b.lastKey, b.lastDev = key, d
}

// buildDevices builds the devices of c's parts, in part order, in one
// allocation.
func buildDevices(c *cases.Circuit) ([]*device, error) {
	t := temperatureOf(c)
	n := 0
	for _, p := range c.Parts {
		if cases.IsDevice(p.Kind) {
			n++
		}
	}
	if n == 0 {
		return nil, nil
	}
	slab := make([]device, n)
	devs := make([]*device, n)
	var built deviceCache
	k := 0
	for _, p := range c.Parts {
		if !cases.IsDevice(p.Kind) {
			continue
		}
		d := &slab[k]
		if err := newDevice(d, c, p, t, &built); err != nil {
			return nil, err
		}
		devs[k] = d
		k++
	}
	return devs, nil
}

// attach connects the device to part p (of the expanded circuit) and to
// the unknowns term of its terminals.
func (d *device) attach(p *cases.Part, term []int) {
	d.part = p
	for t := 0; t < maxTerminals; t++ {
		d.term[t] = -1
	}
	copy(d.term[:], term)
	if p.Kind == cases.MOSFET && len(term) < 4 {
		d.term[3] = d.term[2] // body defaults to the source
	}
}

// register adds the device's matrix positions to the pattern: each
// current-carrying terminal's row, every terminal's column.
func (d *device) register(p *sparse.Pattern) {
	for t := 0; t < maxTerminals; t++ {
		for u := 0; u < maxTerminals; u++ {
			d.slt[t][u] = -1
			if t < d.nt && u < d.nt && d.row[t] && d.term[t] >= 0 && d.term[u] >= 0 {
				d.slt[t][u] = int32(p.Slot(d.term[t], d.term[u]))
			}
		}
	}
}

func volt(x []float64, i int) float64 {
	if i < 0 {
		return 0
	}
	return x[i]
}

// controls returns the controlling voltages at solution x.
func (d *device) controls(x []float64) [3]float64 {
	switch d.kind {
	case cases.Diode:
		return [3]float64{volt(x, d.term[0]) - volt(x, d.term[1])}
	case cases.BJT:
		vb := volt(x, d.term[1])
		return [3]float64{vb - volt(x, d.term[2]), vb - volt(x, d.term[0])}
	default:
		vs := volt(x, d.term[2])
		return [3]float64{volt(x, d.term[1]) - vs, volt(x, d.term[0]) - vs, volt(x, d.term[3]) - vs}
	}
}

// reset makes x's controlling voltages the reference for the next
// limited step.
func (d *device) reset(x []float64) { d.v = d.controls(x) }

// evaluate computes currents and derivatives at solution x. With limit
// set, each junction step from the previous evaluation is limited by the
// device's rule (devices.*.LimitStep); d.limited tells whether it was.
func (d *device) evaluate(x []float64, limit bool) {
	v := d.controls(x)
	d.limited = false
	switch d.kind {
	case cases.Diode:
		if limit {
			v[0], d.limited = d.diode.LimitStep(v[0], d.v[0])
		}
		i, g := d.diode.Current(v[0])
		d.di, d.dg = i, g
		d.cur[0], d.cur[1] = i, -i
		d.jac[0][0], d.jac[0][1] = g, -g
		d.jac[1][0], d.jac[1][1] = -g, g
		vc := volt(x, d.term[1])
		d.ve[0], d.ve[1] = vc+v[0], vc
	case cases.BJT:
		if limit {
			v[0], v[1], d.limited = d.bjt.LimitStep(v[0], d.v[0], v[1], d.v[1])
		}
		s := d.bjt.Eval(v[0], v[1])
		d.bs = s
		// Terminals collector, base, emitter; vbe = Vb − Ve, vbc = Vb − Vc.
		d.cur[0], d.cur[1], d.cur[2] = s.Ic, s.Ib, -s.Ic-s.Ib
		d.jac[0] = [maxTerminals]float64{-s.DIcDVbc, s.DIcDVbe + s.DIcDVbc, -s.DIcDVbe}
		d.jac[1] = [maxTerminals]float64{-s.DIbDVbc, s.DIbDVbe + s.DIbDVbc, -s.DIbDVbe}
		for u := 0; u < 3; u++ {
			d.jac[2][u] = -d.jac[0][u] - d.jac[1][u]
		}
		ve := volt(x, d.term[2])
		d.ve[2], d.ve[1], d.ve[0] = ve, ve+v[0], ve+v[0]-v[1]
	default:
		if limit {
			v[0], v[1], d.limited = d.mos.LimitStep(v[0], d.v[0], v[1], d.v[1])
		}
		s := d.mos.Eval(v[0], v[1], v[2])
		d.ms = s
		// Terminals drain, gate, source, body; vgs, vds, vbs against the source.
		d.cur[0], d.cur[2] = s.Id, -s.Id
		d.jac[0] = [maxTerminals]float64{s.Gds, s.Gm, -s.Gm - s.Gds - s.Gmb, s.Gmb}
		for u := 0; u < 4; u++ {
			d.jac[2][u] = -d.jac[0][u]
		}
		vs := volt(x, d.term[2])
		d.ve = [maxTerminals]float64{vs + v[1], vs + v[0], vs, vs + v[2]}
	}
	d.v = v
}

// stamp adds the Newton companion of the device to the matrix values and
// the right-hand side: the linearization
//
//	I_t(V) ≈ I_t(ve) + Σ_u ∂I_t/∂V_u·(V_u − ve_u)
//
// moves I_t(ve) − Σ_u ∂I_t/∂V_u·ve_u to the right-hand side of the KCL row
// of terminal t (currents leaving the node are positive on the left).
func (d *device) stamp(vals, rhs []float64) {
	for t := 0; t < d.nt; t++ {
		if !d.row[t] || d.term[t] < 0 {
			continue
		}
		c := d.cur[t]
		for u := 0; u < d.nt; u++ {
			g := d.jac[t][u]
			c -= g * d.ve[u]
			if s := d.slt[t][u]; s >= 0 {
				vals[s] += g
			}
		}
		rhs[d.term[t]] -= c
	}
}

// addCurrents adds the device's terminal currents to the KCL residual f
// and their magnitudes to the row scales.
func (d *device) addCurrents(f, scale []float64) {
	for t := 0; t < d.nt; t++ {
		if i := d.term[t]; i >= 0 && d.row[t] {
			f[i] += d.cur[t]
			if a := math.Abs(d.cur[t]); a > scale[i] {
				scale[i] = a
			}
		}
	}
}

// power returns the power the device absorbs, Σ_t V_t·I_t, W.
func (d *device) power(x []float64) float64 {
	var p float64
	for t := 0; t < d.nt; t++ {
		p += volt(x, d.term[t]) * d.cur[t]
	}
	return p
}
