package explain

import (
	"math"
	"sort"

	"tangent/cases"
	"tangent/mna"
)

// TimeConstant is one storage element's entry in a time-constant method.
type TimeConstant struct {
	Element int // index into Explanation.Elements
	// R is the resistance the element sees between its terminals (Ω),
	// +Inf where it sees an open circuit, 0 where it sees a short.
	R float64
	// Tau is R·C for a capacitor and L/R for an inductor (s).
	Tau float64
	// Miller is set for a capacitor of the open-circuit method with
	// neither end at ground: R/(Ra + Rb), with Ra and Rb the resistances
	// from each end to ground in the same network. A passive ladder gives
	// at most 1; a capacitor that bridges gain sees far more than its ends
	// do (the Miller effect: R = R′(1 + gm·R′L) + R′L for the Cμ of a
	// common-emitter stage, Gray & Meyer; from memory). 0 otherwise.
	Miller float64
}

// TimeConstants is one application of a time-constant method (Gray &
// Meyer, Analysis and Design of Analog Integrated Circuits, and Sedra &
// Smith, Microelectronic Circuits, on the open- and short-circuit
// time-constant methods; from memory), independent sources and the
// transfer's drive zeroed, its output terminated as the transfer has it.
//
// Open-circuit method: each storage element sees the circuit at DC with
// the others in their DC state (capacitors open, inductors shorted), and
//
//	Σ τ = Σ Rj0·Cj + Σ Lk/Rk0 = b1,
//
// the s¹ coefficient of det(G + s·C)/det G = 1 + b1·s + … (exactly, as
// b1 = tr(G⁻¹·C)); f_high ≈ 1/(2π·Σ τ).
//
// Short-circuit method: each element sees the circuit with the others in
// their high-frequency state (capacitors shorted, inductors open), and
//
//	Σ 1/τ = Σ 1/(Rj∞·Cj) + Σ Rk∞/Lk = −Σ p,
//
// the sum of the poles, the ratio b_{m−1}/b_m of the two highest
// denominator coefficients: exactly, when there is no loop of capacitors
// (and voltage sources; parallel capacitors are one) and no cut-set of
// inductors (and current sources), for the poles are then the eigenvalues
// of −D⁻¹·H, with D the capacitances and inductances and H the hybrid
// matrix of the resistive network they see. A capacitor in such a loop
// sees R = 0 and the sum is unbounded. f_low ≈ Σ(1/τ)/(2π).
type TimeConstants struct {
	Short bool           // false: open-circuit method; true: short-circuit method
	Items []TimeConstant // by decreasing τ (open) or 1/τ (short)
	// Sum is Σ τ in s (open) or Σ 1/τ in 1/s (short); EstimateHz the band
	// edge it predicts: 1/(2π·Σ τ) or Σ(1/τ)/(2π).
	Sum, EstimateHz float64
	// Caveat says why the estimate may be far off ("" when nothing is
	// known against it).
	Caveat string
}

// Share returns the item's fraction of the method's sum: τ/Σ τ (open) or
// (1/τ)/Σ(1/τ) (short); NaN where the sum is unbounded.
func (t *TimeConstants) Share(it TimeConstant) float64 {
	switch {
	case math.IsInf(t.Sum, 0):
		return math.NaN()
	case t.Sum == 0:
		return 0
	}
	if t.Short {
		return 1 / it.Tau / t.Sum
	}
	return it.Tau / t.Sum
}

// highFrequencyState is the state of a storage element in a network: false
// for its DC state (capacitor open, inductor shorted: how mna stamps it at
// s = 0), true for its high-frequency state (capacitor shorted by a
// zero-volt branch, inductor opened by forcing its branch current to 0).
type highFrequencyState []bool

// timeConstants applies a method to the storage elements test, the other
// storage elements being in the states hf gives (the tested ones must be
// in their DC state for the open-circuit method and in their
// high-frequency state for the short-circuit one). g is the DC matrix of
// the transfer's problem (n×n, row-major) and branch[i] tells a branch
// unknown from a node voltage. ok is false when the network is singular
// (the method does not apply).
//
// A shorted capacitor whose ends are already tied by other shorts (zeroed
// voltage sources, shorted inductors, test-source branches, other shorted
// capacitors: a loop of them) adds nothing but a dependent equation, so
// the network is built with a spanning forest of the shorts: a capacitor
// whose ends the others tie is left out, which changes no voltage. A
// tested capacitor in such a loop sees a short: R = 0 (the short-circuit
// method assumes there is none; its sum is then unbounded).
func timeConstants(g []float64, n int, branchUnknown []bool, elems []element, hf highFrequencyState, test []int, short bool) (*TimeConstants, bool) {
	ties := tieForest(g, n, branchUnknown, elems, hf)
	var shorted []int
	for i, e := range elems {
		if hf[i] && e.Kind == cases.Capacitor {
			shorted = append(shorted, i)
		}
	}
	inLoop := map[int]bool{}
	for _, j := range shorted {
		uf := ties.clone()
		for _, k := range shorted {
			if k != j {
				uf.union(elems[k].a, elems[k].b)
			}
		}
		inLoop[j] = uf.same(elems[j].a, elems[j].b)
	}
	// The network: G, one zero-volt branch per capacitor of the spanning
	// forest of shorts, and each opened inductor's row replaced by i_k = 0.
	branch := map[int]int{}
	m := n
	span := ties.clone()
	for _, i := range shorted {
		if !span.same(elems[i].a, elems[i].b) {
			span.union(elems[i].a, elems[i].b)
			branch[i] = m
			m++
		}
	}
	a := make([]float64, m*m)
	for i := 0; i < n; i++ {
		copy(a[i*m:i*m+n], g[i*n:(i+1)*n])
	}
	ad := rowMajor{a, m}
	for i, e := range elems {
		if !hf[i] {
			continue
		}
		switch e.Kind {
		case cases.Capacitor:
			if k, ok := branch[i]; ok {
				mna.VoltageBranch(ad, e.a, e.b, k)
			}
		case cases.Inductor:
			row := a[e.k*m : (e.k+1)*m]
			for j := range row {
				row[j] = 0
			}
			row[e.k] = 1
		}
	}
	sol, ok := newRealSolver(a, m)
	if !ok {
		return nil, false
	}
	unit := func(idx ...int) []float64 {
		b := make([]float64, m)
		for s, i := range idx {
			if i >= 0 {
				b[i] += float64(1 - 2*s) // +1 at the first index, −1 at the second
			}
		}
		return b
	}
	at := func(x []float64, i int) float64 {
		if i < 0 {
			return 0
		}
		return x[i]
	}
	// resistanceOf turns the response x_r of a branch to a unit voltage in
	// its own row into the resistance seen: x_r = −1/R (the branch current
	// enters at plus, so the network draws 1/R out of it).
	resistanceOf := func(xr float64) float64 {
		if xr == 0 {
			return math.Inf(1)
		}
		return -1 / xr
	}
	tc := &TimeConstants{Short: short}
	for _, i := range test {
		e := elems[i]
		it := TimeConstant{Element: i}
		switch {
		case e.Kind == cases.Capacitor && !hf[i]:
			// Test current into a, out of b: R = V(a) − V(b).
			x := sol.solve(unit(e.a, e.b))
			it.R = at(x, e.a) - at(x, e.b)
			if e.a >= 0 && e.b >= 0 {
				ra := sol.solve(unit(e.a))[e.a]
				rb := sol.solve(unit(e.b))[e.b]
				if ra+rb > 0 {
					it.Miller = it.R / (ra + rb)
				}
			}
		case e.Kind == cases.Capacitor && inLoop[i]:
			it.R = 0
		case e.Kind == cases.Capacitor:
			r := branch[i]
			it.R = resistanceOf(sol.solve(unit(r))[r])
		case !hf[i]:
			// A shorted inductor: a unit voltage in its own row.
			it.R = resistanceOf(sol.solve(unit(e.k))[e.k])
		default:
			// An opened inductor driven by a unit branch current, which
			// leaves the network at a and enters it at b: R = V(b) − V(a).
			x := sol.solve(unit(e.k))
			it.R = at(x, e.b) - at(x, e.a)
		}
		if e.Kind == cases.Capacitor {
			it.Tau = it.R * e.Value
		} else {
			it.Tau = e.Value / it.R
		}
		tc.Items = append(tc.Items, it)
		if short {
			tc.Sum += 1 / it.Tau
		} else {
			tc.Sum += it.Tau
		}
	}
	sort.SliceStable(tc.Items, func(i, j int) bool {
		if short {
			return 1/tc.Items[i].Tau > 1/tc.Items[j].Tau
		}
		return tc.Items[i].Tau > tc.Items[j].Tau
	})
	switch {
	case short:
		tc.EstimateHz = tc.Sum / (2 * math.Pi)
	case tc.Sum > 0:
		tc.EstimateHz = 1 / (2 * math.Pi * tc.Sum)
	default:
		tc.EstimateHz = math.Inf(1)
	}
	return tc, true
}

// rowMajor lets the mna primitives stamp into a row-major slice.
type rowMajor struct {
	a []float64
	n int
}

func (r rowMajor) Add(i, j int, v float64) { r.a[i*r.n+j] += v }

// nodeSets is a union-find over node unknowns, ground included (index −1).
type nodeSets []int

func newNodeSets(n int) nodeSets {
	u := make(nodeSets, n+1)
	for i := range u {
		u[i] = i
	}
	return u
}

func (u nodeSets) clone() nodeSets { return append(nodeSets(nil), u...) }

func (u nodeSets) find(i int) int {
	i++ // ground −1 is slot 0
	for u[i] != i {
		u[i] = u[u[i]]
		i = u[i]
	}
	return i
}

func (u nodeSets) union(a, b int) { u[u.find(a)] = u.find(b) }

func (u nodeSets) same(a, b int) bool { return u.find(a) == u.find(b) }

// tieForest returns the node sets tied together at DC by ideal zero-volt
// constraints of the problem: branch rows of G that read V(p) − V(m) = b
// and nothing else (zeroed independent voltage sources, the test source
// and output short of the transfer, inductors left in their DC state).
// The rows of inductors opened by hf are not ties.
func tieForest(g []float64, n int, branchUnknown []bool, elems []element, hf highFrequencyState) nodeSets {
	opened := map[int]bool{}
	for i, e := range elems {
		if hf[i] && e.Kind == cases.Inductor {
			opened[e.k] = true
		}
	}
	u := newNodeSets(n)
	for r := 0; r < n; r++ {
		if !branchUnknown[r] || opened[r] {
			continue
		}
		plus, minus, pure := -1, -1, true
		for j, v := range g[r*n : (r+1)*n] {
			switch {
			case v == 0:
			case branchUnknown[j]:
				pure = false
			case v == 1 && plus < 0:
				plus = j
			case v == -1 && minus < 0:
				minus = j
			default:
				pure = false
			}
		}
		if pure && (plus >= 0 || minus >= 0) {
			u.union(plus, minus)
		}
	}
	return u
}
