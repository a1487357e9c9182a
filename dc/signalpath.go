package dc

import (
	"tangent/cases"
)

// SignalPath returns the parts that lie in the signal path between ports
// from and to of circuit c, in part order. The definition:
//
// Take the circuit graph with a vertex for every node and every part, and
// an edge from each part to each node it touches. Remove ground and every
// node held by ideal DC voltage sources (those joined to ground through a
// chain of voltage sources with no AC value), except the ports' own nodes:
// for a signal those nodes are fixed, so a path through them is not a
// signal path. A part is in the signal path when some simple path (no
// vertex twice) from a node of the from port to a node of the to port
// passes through it.
//
// A part lies on such a path exactly when its biconnected block lies on
// the path between the two nodes in the block-cut tree (in a biconnected
// graph any vertex lies on a simple path between any two others: Menger's
// theorem; common practice). Blocks are found with Tarjan's depth-first
// search (R. E. Tarjan, SIAM J. Comput. 1(2), 1972, from memory).
func SignalPath(c *cases.Circuit, from, to *cases.Port) []string {
	g := newCircuitGraph(c, from, to)
	on := make([]bool, len(c.Parts))
	for _, s := range []string{from.Plus, from.Minus} {
		for _, t := range []string{to.Plus, to.Minus} {
			si, ok1 := g.node[s]
			ti, ok2 := g.node[t]
			if !ok1 || !ok2 || si == ti {
				continue
			}
			for _, b := range g.treePath(si, ti) {
				for _, v := range g.blocks[b] {
					if v >= g.nNodes {
						on[v-g.nNodes] = true
					}
				}
			}
		}
	}
	var out []string
	for i, p := range c.Parts {
		if on[i] {
			out = append(out, p.Name)
		}
	}
	return out
}

// circuitGraph is the bipartite node–part graph of SignalPath: vertices
// 0..nNodes−1 are kept nodes, nNodes+i is part i.
type circuitGraph struct {
	nNodes int
	node   map[string]int
	adj    [][]int
	blocks [][]int // vertices of each biconnected block
	cut    []bool  // articulation vertices
	member [][]int // blocks of each vertex
}

func newCircuitGraph(c *cases.Circuit, ports ...*cases.Port) *circuitGraph {
	keep := map[string]bool{}
	for _, p := range ports {
		keep[p.Plus], keep[p.Minus] = true, true
	}
	held := heldNodes(c)
	g := &circuitGraph{node: map[string]int{}}
	for _, p := range c.Parts {
		for _, n := range p.Nodes {
			if _, ok := g.node[n]; ok || n == cases.Ground || (held[n] && !keep[n]) {
				continue
			}
			g.node[n] = g.nNodes
			g.nNodes++
		}
	}
	g.adj = make([][]int, g.nNodes+len(c.Parts))
	for i, p := range c.Parts {
		pv := g.nNodes + i
		seen := map[int]bool{}
		for _, n := range p.Nodes {
			v, ok := g.node[n]
			if !ok || seen[v] {
				continue
			}
			seen[v] = true
			g.adj[pv] = append(g.adj[pv], v)
			g.adj[v] = append(g.adj[v], pv)
		}
	}
	g.biconnect()
	return g
}

// heldNodes returns the nodes tied to ground through ideal DC voltage
// sources (no AC value).
func heldNodes(c *cases.Circuit) map[string]bool {
	held := map[string]bool{cases.Ground: true}
	for changed := true; changed; {
		changed = false
		for _, p := range c.Parts {
			if p.Kind != cases.VoltageSource || p.AC != 0 {
				continue
			}
			a, b := p.Nodes[0], p.Nodes[1]
			if held[a] != held[b] {
				held[a], held[b] = true, true
				changed = true
			}
		}
	}
	return held
}

// biconnect finds the biconnected blocks and articulation vertices.
func (g *circuitGraph) biconnect() {
	n := len(g.adj)
	disc := make([]int, n)
	low := make([]int, n)
	g.cut = make([]bool, n)
	g.member = make([][]int, n)
	timer := 0
	type edge struct{ u, v int }
	var stack []edge
	var dfs func(u, parent int)
	dfs = func(u, parent int) {
		timer++
		disc[u], low[u] = timer, timer
		children := 0
		for _, v := range g.adj[u] {
			if disc[v] == 0 {
				children++
				stack = append(stack, edge{u, v})
				dfs(v, u)
				low[u] = min(low[u], low[v])
				if low[v] >= disc[u] {
					if parent >= 0 || children > 1 {
						g.cut[u] = true
					}
					b := len(g.blocks)
					var verts []int
					in := map[int]bool{}
					for {
						e := stack[len(stack)-1]
						stack = stack[:len(stack)-1]
						for _, w := range []int{e.u, e.v} {
							if !in[w] {
								in[w] = true
								verts = append(verts, w)
								g.member[w] = append(g.member[w], b)
							}
						}
						if e.u == u && e.v == v {
							break
						}
					}
					g.blocks = append(g.blocks, verts)
				}
			} else if v != parent && disc[v] < disc[u] {
				stack = append(stack, edge{u, v})
				low[u] = min(low[u], disc[v])
			}
		}
	}
	for v := 0; v < n; v++ {
		if disc[v] == 0 {
			dfs(v, -1)
		}
	}
}

// treePath returns the blocks on the block-cut tree path between vertices
// s and t, or nil when they are not connected.
func (g *circuitGraph) treePath(s, t int) []int {
	nb := len(g.blocks)
	// Tree vertices: block b is b; articulation vertex v is nb+v.
	start := func(v int) int {
		if g.cut[v] {
			return nb + v
		}
		if len(g.member[v]) == 0 {
			return -1
		}
		return g.member[v][0]
	}
	a, z := start(s), start(t)
	if a < 0 || z < 0 {
		return nil
	}
	neighbours := func(x int) []int {
		if x >= nb {
			return g.member[x-nb]
		}
		var out []int
		for _, v := range g.blocks[x] {
			if g.cut[v] {
				out = append(out, nb+v)
			}
		}
		return out
	}
	prev := map[int]int{a: a}
	queue := []int{a}
	for len(queue) > 0 && queue[0] != z {
		x := queue[0]
		queue = queue[1:]
		for _, y := range neighbours(x) {
			if _, ok := prev[y]; !ok {
				prev[y] = x
				queue = append(queue, y)
			}
		}
	}
	if _, ok := prev[z]; !ok {
		return nil
	}
	var path []int
	for x := z; ; x = prev[x] {
		if x < nb {
			path = append(path, x)
		}
		if x == a {
			break
		}
	}
	return path
}
