package cases

import (
	"fmt"
	"slices"
	"strings"
)

// Topology checks, run before any solve on a case whose parts all decoded.
// They find circuits whose DC equations are singular whatever the values:
//
//   - no part connects to gnd;
//   - a loop of voltage sources and inductors (vcvs and ccvs outputs count as
//     voltage sources): at DC an inductor is a short, so the loop's voltage
//     is set twice or its current is undetermined. A source or inductor
//     with both terminals on one node is the smallest such loop;
//   - a node set with no DC path to gnd. A DC path runs through resistors,
//     inductors, voltage sources, vcvs and ccvs outputs, diodes, a bjt's
//     terminals (its junctions conduct) and a mosfet's drain–source
//     channel. It does not run through capacitors (open at DC), current
//     sources and vccs/cccs outputs (infinite impedance), the control
//     inputs of a vcvs or vccs, or a mosfet's gate and body, which draw no
//     current in the square-law model. When current sources (or vccs/cccs
//     outputs) are among the parts that separate such a node set from gnd,
//     they form a cut-set of current sources and capacitors, the dual of the
//     voltage-source loop, and the message says so;
//   - a node with a single connection is a warning: it is legal but
//     usually a misspelt node name.

// unionFind is a disjoint-set forest over node indices.
type unionFind []int

func newUnionFind(n int) unionFind {
	u := make(unionFind, n)
	for i := range u {
		u[i] = i
	}
	return u
}

func (u unionFind) find(i int) int {
	for u[i] != i {
		u[i] = u[u[i]]
		i = u[i]
	}
	return i
}

func (u unionFind) union(i, j int) { u[u.find(i)] = u.find(j) }

// voltageBranch reports whether a part fixes the voltage between its first
// two terminals at DC (a voltage source, a vcvs or ccvs output, or an
// inductor, which is a short at DC).
func voltageBranch(k Kind) bool {
	return k == VoltageSource || k == VCVS || k == CCVS || k == Inductor
}

// dcEdges lists the terminal pairs of a part that form DC paths.
func dcEdges(k Kind) [][2]int {
	switch k {
	case Resistor, Inductor, VoltageSource, VCVS, CCVS, Diode:
		return [][2]int{{0, 1}}
	case BJT:
		return [][2]int{{0, 1}, {1, 2}}
	case MOSFET:
		return [][2]int{{0, 2}}
	}
	return nil
}

// currentBranch reports whether terminal i of a part of kind k is an end of
// a current-source branch (independent, vccs or cccs output).
func currentBranch(k Kind, i int) bool {
	return (k == CurrentSource || k == VCCS || k == CCCS) && i < 2
}

func (b *builder) topology() {
	c := b.c
	index := map[string]int{Ground: 0}
	for i, n := range c.Nodes {
		index[n] = i + 1
	}
	n := len(c.Nodes) + 1

	// Attachments: (part, terminal) pairs per node. A mosfet's body left to
	// default to its source is not a second attachment.
	type attach struct{ part, term int }
	at := make([][]attach, n)
	for pi, part := range c.Parts {
		raw, _ := b.rawEntry("parts", part.Name)
		for ti, node := range part.Nodes {
			if _, given := raw["body"]; part.Kind == MOSFET && ti == 3 && !given {
				continue
			}
			k := index[node]
			at[k] = append(at[k], attach{pi, ti})
		}
	}
	termPath := func(a attach) path {
		p := c.Parts[a.part]
		return path{"parts", p.Name, Terminals(p.Kind)[a.term]}
	}

	hasGround := len(at[0]) > 0
	if !hasGround {
		hint := ""
		for _, node := range c.Nodes {
			if l := strings.ToLower(node); l == "gnd" || l == "ground" || l == "0" {
				hint = fmt.Sprintf("; node names are case-sensitive: did you mean gnd for %q?", node)
				break
			}
		}
		b.errorf(path{"parts", c.Parts[0].Name}, "no part connects to gnd, the reference node%s", hint)
	}

	// Loops of voltage sources and inductors: a branch whose ends are
	// already joined by such branches closes a loop; the loop is the tree
	// path between its ends plus the branch.
	loops := newUnionFind(n)
	tree := make([][]treeEdge, n)
	for pi, part := range c.Parts {
		if !voltageBranch(part.Kind) {
			continue
		}
		x, y := index[part.Nodes[0]], index[part.Nodes[1]]
		p := path{"parts", part.Name}
		switch {
		case x == y:
			b.errorf(p, "both ends of this %s are on node %q: a voltage source or inductor shorted on itself is a loop of voltage sources and inductors", part.Kind, part.Nodes[0])
		case loops.find(x) == loops.find(y):
			names := []string{}
			for _, q := range treePath(tree, x, y) {
				names = append(names, c.Parts[q].Name)
			}
			names = append(names, part.Name)
			b.errorf(p, "parts %s form a loop of voltage sources and inductors: at DC an inductor is a short, so the loop's voltage is fixed twice and its current is undetermined", strings.Join(names, ", "))
		default:
			loops.union(x, y)
			tree[x] = append(tree[x], treeEdge{y, pi})
			tree[y] = append(tree[y], treeEdge{x, pi})
		}
	}

	// DC paths to gnd.
	dc := newUnionFind(n)
	for _, part := range c.Parts {
		for _, e := range dcEdges(part.Kind) {
			dc.union(index[part.Nodes[e[0]]], index[part.Nodes[e[1]]])
		}
	}
	if hasGround {
		groups := map[int][]int{}
		var roots []int
		for k := 1; k < n; k++ {
			r := dc.find(k)
			if r == dc.find(0) {
				continue
			}
			if _, ok := groups[r]; !ok {
				roots = append(roots, r)
			}
			groups[r] = append(groups[r], k)
		}
		for _, r := range roots {
			b.floating(groups[r], dc, r, index)
		}
	}

	// Single connections and parts shorted on themselves.
	for k := 1; k < n; k++ {
		if len(at[k]) == 1 {
			b.warnf(termPath(at[k][0]), "node %q has a single connection; a node needs two or more (node names are case-sensitive: check the spelling)", c.Nodes[k-1])
		}
	}
	for _, part := range c.Parts {
		if (part.Kind == Resistor || part.Kind == Capacitor || part.Kind == CurrentSource) && part.Nodes[0] == part.Nodes[1] {
			b.warnf(path{"parts", part.Name}, "both ends of this %s are on node %q; it has no effect", part.Kind, part.Nodes[0])
		}
	}
}

// floating reports one node set (node indices, all with DC root r) that has
// no DC path to gnd.
func (b *builder) floating(group []int, dc unionFind, r int, index map[string]int) {
	c := b.c
	var nodes []string
	for _, k := range group {
		nodes = append(nodes, fmt.Sprintf("%q", c.Nodes[k-1]))
	}
	what, they, them, their := "node "+nodes[0]+" has", "it is", "it", "its"
	if len(nodes) > 1 {
		what, they, them, their = "nodes "+strings.Join(nodes, ", ")+" have", "they are", "them", "their"
	}

	var where path
	var through []string
	cutset := false
	for _, part := range c.Parts {
		inside, outside := -1, false
		for ti, node := range part.Nodes {
			if dc.find(index[node]) == r {
				if inside < 0 {
					inside = ti
				}
			} else {
				outside = true
			}
		}
		if inside < 0 {
			continue
		}
		if where == nil {
			where = path{"parts", part.Name, Terminals(part.Kind)[inside]}
		}
		if !outside {
			continue
		}
		for ti, node := range part.Nodes {
			if dc.find(index[node]) != r {
				continue
			}
			var d string
			switch {
			case currentBranch(part.Kind, ti):
				cutset = true
				d = part.Name
			case part.Kind == Capacitor:
				d = part.Name
			case part.Kind == VCVS || part.Kind == VCCS:
				d = part.Name + " control input"
			default:
				d = part.Name + " " + Terminals(part.Kind)[ti]
			}
			if !slices.Contains(through, d) {
				through = append(through, d)
			}
		}
	}
	switch {
	case len(through) == 0:
		b.errorf(where, "%s no DC path to gnd: %s not connected to the rest of the circuit", what, they)
	case cutset:
		b.errorf(where, "%s no DC path to gnd: a cut-set of current sources and capacitors (%s) separates %s from gnd, so KCL at DC holds only if those currents cancel, and %s DC voltage is undetermined", what, strings.Join(through, ", "), them, their)
	default:
		b.errorf(where, "%s no DC path to gnd: %s joined to the rest of the circuit only through %s, so %s DC voltage is undetermined (add a resistor to a biased node or to gnd)", what, they, strings.Join(through, ", "), their)
	}
}

// treeEdge is a branch of the voltage-source forest: the node it leads to
// and the part.
type treeEdge struct{ to, part int }

// treePath returns the parts on the path from x to y in a forest given as
// adjacency lists (breadth-first search).
func treePath(tree [][]treeEdge, x, y int) []int {
	type step struct{ from, part int }
	prev := map[int]step{x: {-1, -1}}
	queue := []int{x}
	for len(queue) > 0 {
		k := queue[0]
		queue = queue[1:]
		if k == y {
			break
		}
		for _, e := range tree[k] {
			if _, seen := prev[e.to]; !seen {
				prev[e.to] = step{k, e.part}
				queue = append(queue, e.to)
			}
		}
	}
	var parts []int
	for k := y; k != x; {
		s, ok := prev[k]
		if !ok || s.from < 0 {
			break
		}
		parts = append(parts, s.part)
		k = s.from
	}
	slices.Reverse(parts)
	return parts
}
