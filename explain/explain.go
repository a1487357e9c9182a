package explain

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"tangent/ac"
	"tangent/cases"
	"tangent/mna"
)

// Options adjust Explain.
type Options struct {
	// Devices names the devices whose small-signal parts the circuit holds
	// (the names of smallsignal.Equivalent.Devices), so that Q1_c_mu is
	// labelled "Q1 c_mu".
	Devices []string
}

// Explanation is one transfer of a linear circuit, explained.
type Explanation struct {
	Transfer  *cases.Transfer
	Elements  []Element // every part with a value, in part order
	Rational  *ac.Rational
	Bandwidth ac.Bandwidth

	// Poles are every finite pole of the circuit's pencil det(G + s·C),
	// sorted as package ac sorts roots; the ones a zero cancels are
	// included with Visible false. Zeros are the transfer's zeros after
	// cancellation.
	Poles, Zeros []Root

	// Open and Short are the open- and short-circuit methods over every
	// storage element (see TimeConstants); nil where the network they need
	// is singular (Notes says so). B1 = −Σ 1/p and PoleSum = −Σ p over
	// Poles are what their sums equal exactly; NaN where a pole is at the
	// origin (B1) or there is no pole.
	Open, Short *TimeConstants
	B1, PoleSum float64

	// LowFrequency marks, per element, the storage elements classed as
	// low-frequency ones: those whose largest storage share is in a pole
	// below the mid-band reference frequency (coupling and bypass
	// capacitors); the others are high-frequency ones (device and load
	// capacitances). High is the open-circuit method over the
	// high-frequency elements with the low-frequency ones in their
	// mid-band state (shorted capacitors, open inductors), the textbook
	// estimate of f_high; Low the short-circuit method over the
	// low-frequency elements with the high-frequency ones open, that of
	// f_low. Each is nil where the transfer has no such band edge or the
	// network is singular.
	LowFrequency []bool
	High, Low    *TimeConstants

	Summary Summary
	Notes   []string // why a method or a sensitivity is missing
}

// Summary is the mid-band description of a transfer.
type Summary struct {
	// RefHz is where the mid-band value is taken: 0 at DC, the peak of
	// |H| for a band-pass, +Inf for a high-pass (ac.Bandwidth's
	// reference), NaN when |H| has no finite reference level.
	RefHz float64
	// Value is H there (V/V, A/A, S or Ω): H(0), H(j·2π·RefHz), or the
	// limit at infinite frequency.
	Value complex128
	// HighPole and LowPole index the visible poles nearest (on a log
	// scale) to the upper and lower −3 dB frequencies: the poles that set
	// the band edges. −1 when there is none.
	HighPole, LowPole int
	// Lines say it in words, one fact a line.
	Lines []string
}

// Explain explains transfer t of the linear circuit c (no diodes or
// transistors: see package smallsignal): the sensitivity of every pole and
// zero to every element value, the time-constant estimates of its band
// edges against the exact ones, and a mid-band summary. It fails where
// package ac cannot analyse the transfer.
func Explain(c *cases.Circuit, t *cases.Transfer, opt Options) (*Explanation, error) {
	p, err := ac.Setup(c, t)
	if err != nil {
		return nil, err
	}
	sys, err := mna.Build(c)
	if err != nil {
		return nil, err
	}
	if err := sameLayout(sys.Layout, p.Layout); err != nil {
		return nil, err
	}
	elems, err := elements(c, sys, opt.Devices)
	if err != nil {
		return nil, err
	}
	what := fmt.Sprintf("%s → %s (%s)", t.From, t.To, t.Kind)
	r, err := ac.Analyze(p)
	if err != nil {
		return nil, fmt.Errorf("explain: %s: %w", what, err)
	}
	allPoles, err := ac.Poles(p)
	if err != nil {
		return nil, fmt.Errorf("explain: %s: %w", what, err)
	}
	allZeros, err := ac.Zeros(p)
	if err != nil && !errors.Is(err, ac.ErrZeroTransfer) {
		return nil, fmt.Errorf("explain: %s: %w", what, err)
	}
	x := &Explanation{Transfer: t, Rational: r, Bandwidth: r.Bandwidth()}
	for _, e := range elems {
		x.Elements = append(x.Elements, e.Element)
	}

	// Poles, visible or cancelled, and zeros, with their sensitivities.
	pp := polePencil(p)
	cancelled := append([]complex128(nil), r.Cancelled...)
	for _, s := range allPoles {
		root := Root{S: s, Visible: true}
		for i, c := range cancelled {
			if cmplx.Abs(c-s) <= clusterTol*cmplx.Abs(s) {
				root.Visible = false
				cancelled = append(cancelled[:i], cancelled[i+1:]...)
				break
			}
		}
		root.Sens, root.Note = sensitivities(pp, s, allPoles, elems)
		x.Poles = append(x.Poles, root)
	}
	zp := zeroPencil(p)
	for _, s := range r.Zeros {
		root := Root{S: s, Visible: true}
		root.Sens, root.Note = sensitivities(zp, s, allZeros, elems)
		x.Zeros = append(x.Zeros, root)
	}

	// Time constants over every storage element.
	var storage []int
	for i, e := range elems {
		switch {
		case !e.Storage():
		case e.Kind == cases.Capacitor && e.a == e.b:
			// Both ends on one node: it never charges, and a short across
			// it would be a zero row.
			x.Notes = append(x.Notes, fmt.Sprintf("%s connects node %s to itself: no time constant", e.Label(), nodeName(sys, e.a)))
		default:
			storage = append(storage, i)
		}
	}
	x.B1, x.PoleSum = math.NaN(), math.NaN()
	if len(allPoles) > 0 {
		var b1, sum complex128
		for _, s := range allPoles {
			b1 -= 1 / s
			sum -= s
		}
		if !cmplx.IsInf(b1) && !cmplx.IsNaN(b1) {
			x.B1 = real(b1)
		}
		x.PoleSum = real(sum)
	}
	branchUnknown := make([]bool, pp.n)
	for i := range branchUnknown {
		branchUnknown[i] = i >= sys.Layout.Size() || sys.Layout.Unknowns[i].Branch
	}
	dcState := make(highFrequencyState, len(elems))
	hfState := make(highFrequencyState, len(elems))
	for _, i := range storage {
		hfState[i] = true
	}
	if len(storage) > 0 {
		var ok bool
		if x.Open, ok = timeConstants(pp.g, pp.n, branchUnknown, elems, dcState, storage, false); !ok {
			x.Notes = append(x.Notes, "open-circuit time constants: the network at DC is singular (a node reached only through capacitors or current sources)")
		}
		if x.Short, ok = timeConstants(pp.g, pp.n, branchUnknown, elems, hfState, storage, true); !ok {
			x.Notes = append(x.Notes, "short-circuit time constants: the network with every capacitor shorted and every inductor open is singular (a cut-set of inductors and current sources)")
		}
	}

	// Band-edge estimates: low- and high-frequency elements.
	x.classify(storage)
	var lo, hi []int
	for _, i := range storage {
		if x.LowFrequency[i] {
			lo = append(lo, i)
		} else {
			hi = append(hi, i)
		}
	}
	bw := x.Bandwidth
	var ok bool
	if len(hi) > 0 && bw.HighHz != nil {
		if x.High, ok = timeConstants(pp.g, pp.n, branchUnknown, elems, x.midBand(), hi, false); !ok {
			x.Notes = append(x.Notes, "f_high estimate: the mid-band network is singular")
		}
	}
	if len(lo) > 0 && bw.LowHz != nil {
		if x.Low, ok = timeConstants(pp.g, pp.n, branchUnknown, elems, x.midBand(), lo, true); !ok {
			x.Notes = append(x.Notes, "f_low estimate: the network with the low-frequency capacitors shorted is singular")
		}
	}
	x.zeroCaveats()
	for _, tc := range []*TimeConstants{x.Short, x.Low} {
		if tc == nil {
			continue
		}
		var loop []string
		for _, it := range tc.Items {
			if e := x.Elements[it.Element]; e.Kind == cases.Capacitor && it.R == 0 {
				loop = append(loop, e.Label())
			}
		}
		if len(loop) > 0 && tc == x.Short {
			x.Notes = append(x.Notes, fmt.Sprintf("short-circuit time constants: %s in loops of capacitors and voltage sources (parallel capacitors make one), so Σ 1/τ is unbounded and does not equal −Σ p (the method assumes no such loop)", strings.Join(loop, ", ")))
		} else if len(loop) > 0 {
			x.Notes = append(x.Notes, fmt.Sprintf("f_low estimate: %s in a loop of capacitors and voltage sources at mid-band", strings.Join(loop, ", ")))
		}
	}
	for _, rt := range append(append([]Root(nil), x.Poles...), x.Zeros...) {
		if rt.Note != "" && rt.S != 0 {
			x.Notes = append(x.Notes, fmt.Sprintf("root %s: %s, no sensitivities", rootWords(rt.S), rt.Note))
		}
	}
	x.summarize()
	return x, nil
}

// midBand is the state of the storage elements at mid-band: the
// low-frequency ones in their high-frequency state, the others at DC.
func (x *Explanation) midBand() highFrequencyState {
	return highFrequencyState(x.LowFrequency)
}

// sensitivities returns the sensitivities of root s of pencil pc, or none
// with a note when s is a multiple root of all (the pencil's roots).
func sensitivities(pc *pencil, s complex128, all []complex128, elems []element) ([]Sensitivity, string) {
	if multiple(s, all) {
		return nil, "multiple root"
	}
	return rootSensitivities(pc, s, elems)
}

// classify sets LowFrequency: a storage element is a low-frequency one when
// the pole in which it has its largest storage share (at least minShare)
// lies below the mid-band reference frequency (every one for a high-pass,
// none for a reference at DC or none at all).
func (x *Explanation) classify(storage []int) {
	x.LowFrequency = make([]bool, len(x.Elements))
	bw := x.Bandwidth
	if bw.Reference == 0 || bw.RefHz == 0 {
		return
	}
	wref := 2 * math.Pi * bw.RefHz
	for _, i := range storage {
		best, where := 0.0, -1
		for k, p := range x.Poles {
			for _, sv := range p.Sens {
				if sv.Element == i && math.Abs(sv.Storage) > best {
					best, where = math.Abs(sv.Storage), k
				}
			}
		}
		// An element with no real share of any pole (one in a loop of
		// capacitors, whose pole its partner sets) stays a high-frequency
		// one: open at mid-band.
		if where >= 0 && best >= minShare {
			x.LowFrequency[i] = cmplx.Abs(x.Poles[where].S) < wref
		}
	}
}

// sameLayout checks that the problem numbers the circuit's unknowns as
// mna.Build does, which the element stamps rely on.
func sameLayout(a, b *mna.Layout) error {
	if a.Size() != b.Size() {
		return fmt.Errorf("explain: the transfer's problem has %d circuit unknowns, mna.Build %d", b.Size(), a.Size())
	}
	for i, u := range a.Unknowns {
		if b.Unknowns[i] != u {
			return fmt.Errorf("explain: unknown %d is %v in the transfer's problem, %v in mna.Build", i, b.Unknowns[i], u)
		}
	}
	return nil
}

// nodeName returns the name of unknown i, "gnd" for −1.
func nodeName(sys *mna.System, i int) string {
	if i < 0 {
		return cases.Ground
	}
	return sys.Layout.Unknowns[i].Name
}

// zeroCaveats notes the zeros that the band-edge estimates ignore: the
// time-constant methods estimate a dominant pole and assume that no zero
// lies between mid-band and the edge (Gray & Meyer; from memory).
func (x *Explanation) zeroCaveats() {
	bw := x.Bandwidth
	wref := 2 * math.Pi * bw.RefHz
	for _, c := range []struct {
		tc     *TimeConstants
		edge   *float64
		name   string
		within func(a, edge float64) bool
	}{
		{x.High, bw.HighHz, "f_high", func(a, edge float64) bool { return a > wref && a < edge }},
		{x.Low, bw.LowHz, "f_low", func(a, edge float64) bool { return a < wref && a > edge }},
	} {
		if c.tc == nil || c.edge == nil {
			continue
		}
		for _, z := range x.Zeros {
			if a := cmplx.Abs(z.S); a != 0 && c.within(a, 2*math.Pi**c.edge) {
				c.tc.Caveat = fmt.Sprintf("the method assumes no zero between mid-band and %s; there is one at %s", c.name, eng(a/(2*math.Pi), "Hz"))
				x.Notes = append(x.Notes, c.name+" estimate: "+c.tc.Caveat)
				break
			}
		}
	}
}
