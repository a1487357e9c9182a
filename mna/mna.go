// Package mna writes the modified nodal equations of a circuit: the one
// stamping layer that the DC solver and the AC stage share.
//
// The equations are
//
//	(G + s·C)·x = b
//
// where x holds the node voltages (V, ground excluded) followed by branch
// currents (A) of the parts that need one: voltage sources, inductors,
// voltage-controlled and current-controlled voltage sources, and any part
// whose current controls a cccs or ccvs. Every node row is Kirchhoff's
// current law written as the sum of currents leaving the node through the
// parts, equal to the current injected by independent sources (b). A
// branch current is the current into the part's first-named terminal,
// so a voltage source that delivers power has a negative current.
//
// At DC (s = 0) a capacitor is open and an inductor is a short. Package
// mna stamps linear parts only; the nonlinear devices (diode, bjt,
// mosfet) are left to the DC solver, which stamps their Newton companion
// through the same primitives (Conductance, Transconductance, Current).
package mna

import (
	"fmt"
	"math"
	"math/cmplx"

	"tangent/cases"
)

// Adder receives matrix coefficients: Add(i, j, v) adds v to entry (i, j).
// Stamping primitives never call it with a negative index (ground).
type Adder interface {
	Add(i, j int, v float64)
}

// Entry is one coefficient of a matrix in triplet form. Entries with the
// same Row and Col add.
type Entry struct {
	Row, Col int
	Value    float64
}

// Triplets is an Adder that records entries in order.
type Triplets []Entry

// Add appends the entry.
func (t *Triplets) Add(i, j int, v float64) { *t = append(*t, Entry{i, j, v}) }

// Unknown names one unknown of the equations.
type Unknown struct {
	Name   string // node name, or the part name for a branch current
	Branch bool   // true: a branch current (A); false: a node voltage (V)
}

// Layout numbers the unknowns. Ground is index −1 and is not an unknown.
type Layout struct {
	Unknowns []Unknown
	nodes    map[string]int
	branches map[string]int
}

// NewLayout returns an empty layout.
func NewLayout() *Layout {
	return &Layout{nodes: map[string]int{}, branches: map[string]int{}}
}

// Size returns the number of unknowns.
func (l *Layout) Size() int { return len(l.Unknowns) }

// Node returns the index of a node voltage, −1 for ground. ok is false for
// a node the layout does not know.
func (l *Layout) Node(name string) (index int, ok bool) {
	if name == cases.Ground {
		return -1, true
	}
	i, ok := l.nodes[name]
	return i, ok
}

// Branch returns the index of a part's branch current.
func (l *Layout) Branch(part string) (index int, ok bool) {
	i, ok := l.branches[part]
	return i, ok
}

// AddNode adds a node (if new) and returns its index; ground gives −1.
func (l *Layout) AddNode(name string) int {
	if name == cases.Ground {
		return -1
	}
	if i, ok := l.nodes[name]; ok {
		return i
	}
	i := len(l.Unknowns)
	l.Unknowns = append(l.Unknowns, Unknown{Name: name})
	l.nodes[name] = i
	return i
}

// firstUnknown returns the index of the first node unknown named name.
func (l *Layout) firstUnknown(name string) int {
	for i, u := range l.Unknowns {
		if !u.Branch && u.Name == name {
			return i
		}
	}
	return -1
}

// AddBranch adds a branch current for a part and returns its index.
func (l *Layout) AddBranch(part string) int {
	if i, ok := l.branches[part]; ok {
		return i
	}
	i := len(l.Unknowns)
	l.Unknowns = append(l.Unknowns, Unknown{Name: part, Branch: true})
	l.branches[part] = i
	return i
}

// System is the linear part of a circuit's equations.
type System struct {
	Layout *Layout
	// Terminals[k] holds the unknown index of each terminal of the
	// circuit's part k (c.Parts order), in cases.Terminals order (−1 for
	// ground). A part whose current controls another is moved behind a
	// zero-volt sense branch, so its first terminal here is an internal
	// node. (A slice by position, not a map by name: Build is on the
	// path of every operating point, and a map was a good part of it.)
	Terminals [][]int
	G, C      Triplets // coefficients of the linear parts
	// branch[k] is the branch-current unknown of part k, −1 for none:
	// PartCurrent's answer without a lookup by name.
	branch []int
	DC     []float64    // b for the DC values of the independent sources
	AC     []complex128 // b for the AC values (magnitude·exp(j·phase))
}

// senseSuffix names the internal node between a controlling part and its
// first terminal. A colon cannot be confused with a node of the file in
// practice, and Build checks for a clash.
const senseSuffix = ":sense"

// Build numbers the unknowns of circuit c and stamps every linear part.
// Devices (diode, bjt, mosfet) get their terminal nodes numbered but are
// not stamped. Nodes are numbered in c.Nodes order, then branch currents in
// part order, so the same circuit always gives the same layout.
func Build(c *cases.Circuit) (*System, error) {
	// Maps and slices are sized up front: growing them dominated the cost
	// of Build on large circuits.
	var controls map[string]bool // nil, and free to query, when no part is controlled
	for _, p := range c.Parts {
		if p.Kind == cases.CCCS || p.Kind == cases.CCVS {
			if controls == nil {
				controls = map[string]bool{}
			}
			controls[p.Control] = true
		}
	}
	extra := 0 // branch currents and sense nodes
	for _, p := range c.Parts {
		if hasBranch(p.Kind) || controls[p.Name] {
			extra++
		}
		if controls[p.Name] && !hasBranch(p.Kind) {
			extra++
		}
	}
	l := &Layout{
		Unknowns: make([]Unknown, 0, len(c.Nodes)+extra),
		nodes:    make(map[string]int, len(c.Nodes)),
		branches: map[string]int{},
	}
	for _, n := range c.Nodes {
		// AddNode without its lookup: one map access per node. A name
		// listed twice keeps its first index.
		if n == cases.Ground {
			continue
		}
		i, before := len(l.Unknowns), len(l.nodes)
		l.nodes[n] = i
		if len(l.nodes) == before {
			l.nodes[n] = l.firstUnknown(n)
			continue
		}
		l.Unknowns = append(l.Unknowns, Unknown{Name: n})
	}
	s := &System{Layout: l, Terminals: make([][]int, len(c.Parts))}
	nt := 0
	for _, p := range c.Parts {
		nt += len(p.Nodes)
	}
	slab := make([]int, nt)
	// Terminal indices, with sense nodes for controlling parts.
	for k, p := range c.Parts {
		idx := slab[:len(p.Nodes):len(p.Nodes)]
		slab = slab[len(p.Nodes):]
		for i, n := range p.Nodes {
			j, ok := l.Node(n)
			if !ok {
				j = l.AddNode(n)
			}
			idx[i] = j
		}
		if controls[p.Name] && !hasBranch(p.Kind) {
			name := p.Name + senseSuffix
			if _, clash := l.Node(name); clash {
				return nil, fmt.Errorf("mna: internal node %q clashes with a node of the circuit", name)
			}
			idx[0] = l.AddNode(name)
		}
		s.Terminals[k] = idx
	}
	s.branch = make([]int, len(c.Parts))
	for k, p := range c.Parts {
		s.branch[k] = -1
		if hasBranch(p.Kind) || controls[p.Name] {
			s.branch[k] = l.AddBranch(p.Name)
		}
	}
	n := l.Size()
	// Room for the entries stamp writes, ground terminals included.
	ng, nc := 0, 0
	for _, p := range c.Parts {
		if controls[p.Name] && !hasBranch(p.Kind) {
			ng += 4 // sense branch
		}
		switch p.Kind {
		case cases.Resistor, cases.VoltageSource, cases.VCCS:
			ng += 4
		case cases.Capacitor:
			nc += 4
		case cases.Inductor:
			ng += 4
			nc++
		case cases.VCVS:
			ng += 6
		case cases.CCCS:
			ng += 2
		case cases.CCVS:
			ng += 5
		}
	}
	s.G = make(Triplets, 0, ng)
	s.C = make(Triplets, 0, nc)
	s.DC = make([]float64, n)
	s.AC = make([]complex128, n)
	for k, p := range c.Parts {
		if err := s.stamp(p, s.Terminals[k], controls[p.Name]); err != nil {
			return nil, err
		}
	}
	s.DCSources(c, s.DC)
	return s, nil
}

// DCSources writes into b (length Layout.Size()) the right-hand side of
// the DC values of c's independent sources: a voltage source's value in
// its branch row, a current source's current out of its from node and
// into its to node, zero elsewhere. c is the circuit the system was built
// from, or a copy of it with other source values (a DC sweep); the sums
// are taken in part order, as Build takes them, so for c itself b equals
// DC bit for bit.
func (s *System) DCSources(c *cases.Circuit, b []float64) {
	clear(b)
	for k, p := range c.Parts {
		switch p.Kind {
		case cases.VoltageSource:
			kb, _ := s.Layout.Branch(p.Name)
			b[kb] += p.DC
		case cases.CurrentSource:
			t := s.Terminals[k]
			Current(b, t[0], t[1], p.DC)
		}
	}
}

// hasBranch reports whether parts of kind k carry a branch current of
// their own (a part of another kind gets one only when its current
// controls another part).
func hasBranch(k cases.Kind) bool {
	switch k {
	case cases.VoltageSource, cases.Inductor, cases.VCVS, cases.CCVS:
		return true
	}
	return false
}

// stamp stamps part p, whose terminals are the unknowns t.
func (s *System) stamp(p *cases.Part, t []int, control bool) error {
	if control && !hasBranch(p.Kind) {
		// Zero-volt sense source from the real first terminal to the
		// internal node: its branch current is the part's current.
		k, _ := s.Layout.Branch(p.Name)
		real, _ := s.Layout.Node(p.Nodes[0])
		VoltageBranch(&s.G, real, t[0], k)
	}
	switch p.Kind {
	case cases.Resistor:
		Conductance(&s.G, t[0], t[1], 1/p.Value)
	case cases.Capacitor:
		Conductance(&s.C, t[0], t[1], p.Value)
	case cases.Inductor:
		k, _ := s.Layout.Branch(p.Name)
		VoltageBranch(&s.G, t[0], t[1], k)
		s.C.Add(k, k, -p.Value)
	case cases.VoltageSource:
		k, _ := s.Layout.Branch(p.Name)
		VoltageBranch(&s.G, t[0], t[1], k)
		s.AC[k] += phasor(p.AC, p.ACPhase)
	case cases.CurrentSource:
		ac := phasor(p.AC, p.ACPhase)
		if t[0] >= 0 {
			s.AC[t[0]] -= ac
		}
		if t[1] >= 0 {
			s.AC[t[1]] += ac
		}
	case cases.VCVS:
		k, _ := s.Layout.Branch(p.Name)
		VoltageBranch(&s.G, t[0], t[1], k)
		addIf(&s.G, k, t[2], -p.Value)
		addIf(&s.G, k, t[3], p.Value)
	case cases.VCCS:
		Transconductance(&s.G, t[0], t[1], t[2], t[3], p.Value)
	case cases.CCCS:
		kc, ok := s.Layout.Branch(p.Control)
		if !ok {
			return fmt.Errorf("mna: %s: control part %q has no current", p.Name, p.Control)
		}
		addIf(&s.G, t[0], kc, p.Value)
		addIf(&s.G, t[1], kc, -p.Value)
	case cases.CCVS:
		kc, ok := s.Layout.Branch(p.Control)
		if !ok {
			return fmt.Errorf("mna: %s: control part %q has no current", p.Name, p.Control)
		}
		k, _ := s.Layout.Branch(p.Name)
		VoltageBranch(&s.G, t[0], t[1], k)
		s.G.Add(k, kc, -p.Value)
	case cases.Diode, cases.BJT, cases.MOSFET:
		// stamped by the DC solver; replaced by linear parts for AC
	default:
		return fmt.Errorf("mna: %s: unknown part kind %q", p.Name, p.Kind)
	}
	return nil
}

func phasor(mag, phase float64) complex128 {
	if mag == 0 {
		return 0
	}
	return cmplx.Rect(mag, phase)
}

func addIf(m Adder, i, j int, v float64) {
	if i >= 0 && j >= 0 {
		m.Add(i, j, v)
	}
}

// Conductance stamps a two-terminal admittance g between nodes a and b
// (a current g·(Va − Vb) from a to b). With m = C it stamps a capacitance.
func Conductance(m Adder, a, b int, g float64) {
	addIf(m, a, a, g)
	addIf(m, b, b, g)
	addIf(m, a, b, -g)
	addIf(m, b, a, -g)
}

// Transconductance stamps a current gm·(V(cp) − V(cm)) that leaves node
// from, passes through the source and enters node to.
func Transconductance(m Adder, from, to, cp, cm int, gm float64) {
	addIf(m, from, cp, gm)
	addIf(m, from, cm, -gm)
	addIf(m, to, cp, -gm)
	addIf(m, to, cm, gm)
}

// VoltageBranch stamps the incidence of branch k between nodes plus and
// minus: the branch current enters at plus and leaves at minus (KCL
// columns), and row k reads V(plus) − V(minus) = b[k] plus whatever the
// caller adds to row k.
func VoltageBranch(m Adder, plus, minus, k int) {
	addIf(m, plus, k, 1)
	addIf(m, minus, k, -1)
	addIf(m, k, plus, 1)
	addIf(m, k, minus, -1)
}

// Current adds to the right-hand side b an independent current i that
// leaves node from, passes through the source and enters node to.
func Current(b []float64, from, to int, i float64) {
	if from >= 0 {
		b[from] -= i
	}
	if to >= 0 {
		b[to] += i
	}
}

// Voltage returns V(a) − V(b) from a solution vector; −1 is ground.
func Voltage(x []float64, a, b int) float64 {
	return at(x, a) - at(x, b)
}

func at(x []float64, i int) float64 {
	if i < 0 {
		return 0
	}
	return x[i]
}

// PartCurrent returns the DC current into the first terminal of the
// linear part p, the circuit's part number k, from a DC solution x
// (capacitors carry none). It returns NaN for a device, whose current the
// DC solver knows.
func (s *System) PartCurrent(k int, p *cases.Part, x []float64) float64 {
	if b := s.branch[k]; b >= 0 {
		return x[b]
	}
	t := s.Terminals[k]
	switch p.Kind {
	case cases.Resistor:
		return Voltage(x, t[0], t[1]) / p.Value
	case cases.Capacitor:
		return 0
	case cases.CurrentSource:
		return p.DC
	case cases.VCCS:
		return p.Value * Voltage(x, t[2], t[3])
	case cases.CCCS:
		kc, _ := s.Layout.Branch(p.Control)
		return p.Value * x[kc]
	}
	return math.NaN()
}
