package ac

import (
	"math"
	"sort"
)

// bandPencil solves (g + t·c)·x = r for complex t by Gaussian elimination
// with partial pivoting on a band: the unknowns and equations are
// renumbered by the reverse Cuthill-McKee ordering of the pencil's graph
// (Cuthill & McKee, Reducing the bandwidth of sparse symmetric matrices,
// ACM 1969; George's reversal, 1971; from memory), which gathers the
// entries of circuit matrices, whose unknowns couple only to their
// neighbours, in a narrow band: kl subdiagonals and ku superdiagonals.
// Elimination with row interchanges stays within kl subdiagonals and
// kl + ku superdiagonals (the band LU of lapack's zgbtrf), costing
// n·kl·(kl + ku) complex multiply-adds instead of n³/3; a dense pencil
// simply has kl = ku = n − 1.
//
// Unlike an orthogonal reduction, elimination on the band never mixes
// an entry into a position that is zero in the circuit's structure, so
// tiny outputs far from the input (a transfer falling as a high power of
// s above its poles) come out with small relative error; it is the
// reference solve of the sweep and of root refinement.
type bandPencil struct {
	n, kl, ku int
	perm      []int        // perm[new] = old
	gab, cab  []float64    // g and c, permuted, in the band storage of ab
	ab        []complex128 // LU factors in lapack band storage, column-major
	ipiv      []int
	ldab      int
}

// newBandPencil orders the n×n pencil g + t·c (row-major, not copied).
func newBandPencil(n int, g, c []float64) *bandPencil {
	bp := &bandPencil{n: n, perm: rcmOrder(n, g, c)}
	inv := make([]int, n)
	for k, i := range bp.perm {
		inv[i] = k
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if g[i*n+j] == 0 && c[i*n+j] == 0 {
				continue
			}
			a, b := inv[i], inv[j]
			if a > b {
				bp.kl = max(bp.kl, a-b)
			} else {
				bp.ku = max(bp.ku, b-a)
			}
		}
	}
	bp.ldab = 2*bp.kl + bp.ku + 1
	bp.ab = make([]complex128, bp.ldab*n)
	bp.gab = make([]float64, bp.ldab*n)
	bp.cab = make([]float64, bp.ldab*n)
	bp.ipiv = make([]int, n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if g[i*n+j] != 0 || c[i*n+j] != 0 {
				k := bp.at(inv[i], inv[j])
				bp.gab[k], bp.cab[k] = g[i*n+j], c[i*n+j]
			}
		}
	}
	return bp
}

// cost is the number of complex multiply-adds of one factorization.
func (bp *bandPencil) cost() int { return bp.n * bp.kl * (bp.kl + bp.ku) }

// rcmOrder returns the reverse Cuthill-McKee ordering of the symmetrized
// pattern of g + c: perm[new] = old.
func rcmOrder(n int, g, c []float64) []int {
	adj := make([][]int, n)
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			if g[i*n+j] != 0 || c[i*n+j] != 0 || g[j*n+i] != 0 || c[j*n+i] != 0 {
				adj[i] = append(adj[i], j)
				adj[j] = append(adj[j], i)
			}
		}
	}
	deg := func(i int) int { return len(adj[i]) }
	for i := range adj {
		a := adj[i]
		sort.Slice(a, func(x, y int) bool {
			if deg(a[x]) != deg(a[y]) {
				return deg(a[x]) < deg(a[y])
			}
			return a[x] < a[y]
		})
	}
	seen := make([]bool, n)
	order := make([]int, 0, n)
	level := make([]int, n)
	// bfs appends the component of s in Cuthill-McKee order and returns
	// the last vertex of its deepest level and that depth.
	bfs := func(s int, mark []bool, out *[]int) (int, int) {
		queue := []int{s}
		mark[s] = true
		level[s] = 0
		last := s
		for h := 0; h < len(queue); h++ {
			v := queue[h]
			if out != nil {
				*out = append(*out, v)
			}
			if level[v] > level[last] || (level[v] == level[last] && deg(v) < deg(last)) {
				last = v
			}
			for _, w := range adj[v] {
				if !mark[w] {
					mark[w] = true
					level[w] = level[v] + 1
					queue = append(queue, w)
				}
			}
		}
		return last, level[last]
	}
	tmp := make([]bool, n)
	for s0 := 0; s0 < n; s0++ {
		if seen[s0] {
			continue
		}
		// Pseudo-peripheral start (Gibbs, Poole & Stockmeyer's
		// heuristic, from memory): from a vertex of least degree, move
		// to the far end of its level structure while that deepens it.
		s := s0
		for _, v := range componentOf(s0, adj) {
			if deg(v) < deg(s) {
				s = v
			}
		}
		depth := -1
		for it := 0; it < 8; it++ {
			for i := range tmp {
				tmp[i] = seen[i]
			}
			far, d := bfs(s, tmp, nil)
			if d <= depth {
				break
			}
			depth, s = d, far
		}
		bfs(s, seen, &order)
	}
	for i, j := 0, len(order)-1; i < j; i, j = i+1, j-1 {
		order[i], order[j] = order[j], order[i]
	}
	return order
}

// componentOf lists the vertices connected to s.
func componentOf(s int, adj [][]int) []int {
	mark := map[int]bool{s: true}
	out := []int{s}
	for h := 0; h < len(out); h++ {
		for _, w := range adj[out[h]] {
			if !mark[w] {
				mark[w] = true
				out = append(out, w)
			}
		}
	}
	return out
}

// at returns the index in ab of entry (i, j) of the permuted matrix.
func (bp *bandPencil) at(i, j int) int { return bp.kl + bp.ku + i - j + j*bp.ldab }

// factor computes the LU factors of P·(g + t·c)·Pᵀ. A zero pivot (t is an
// eigenvalue to working precision) is replaced by ε times the largest
// entry, so that solves return a large multiple of the null vector, as
// in inverse iteration; factor reports whether that happened.
func (bp *bandPencil) factor(t complex128) (exact bool) {
	n, kl, ku := bp.n, bp.kl, bp.ku
	ab := bp.ab
	var amax float64
	for i, gv := range bp.gab {
		v := complex(gv+real(t)*bp.cab[i], imag(t)*bp.cab[i])
		ab[i] = v
		amax = math.Max(amax, abs1(v))
	}
	tiny := complex(epsilon*amax, 0)
	if amax == 0 {
		tiny = complex(1, 0)
	}
	exact = true
	ju := 0
	for j := 0; j < n; j++ {
		km := min(kl, n-1-j)
		jp, pm := 0, -1.0
		for i := 0; i <= km; i++ {
			if v := abs1(ab[bp.at(j+i, j)]); v > pm {
				jp, pm = i, v
			}
		}
		bp.ipiv[j] = j + jp
		if pm == 0 {
			ab[bp.at(j, j)] = tiny
			jp = 0
			bp.ipiv[j] = j
			exact = false
		}
		ju = max(ju, min(j+ku+jp, n-1))
		if jp != 0 {
			for k := j; k <= ju; k++ {
				x, y := bp.at(j, k), bp.at(j+jp, k)
				ab[x], ab[y] = ab[y], ab[x]
			}
		}
		if km == 0 {
			continue
		}
		inv := 1 / ab[bp.at(j, j)]
		col := bp.at(j+1, j)
		for i := 0; i < km; i++ {
			ab[col+i] *= inv
		}
		for k := j + 1; k <= ju; k++ {
			u := ab[bp.at(j, k)]
			if u == 0 {
				continue
			}
			dst := bp.at(j+1, k)
			for i := 0; i < km; i++ {
				ab[dst+i] -= ab[col+i] * u
			}
		}
	}
	return exact
}

// solve overwrites x (in the original numbering) with (g + t·c)⁻¹·x for
// the t of the last factor; w is workspace of length n.
func (bp *bandPencil) solve(x, w []complex128) {
	n, kl, ku := bp.n, bp.kl, bp.ku
	for a := 0; a < n; a++ {
		w[a] = x[bp.perm[a]]
	}
	ab := bp.ab
	// L: forward with the row interchanges.
	for j := 0; j < n-1; j++ {
		if p := bp.ipiv[j]; p != j {
			w[j], w[p] = w[p], w[j]
		}
		km := min(kl, n-1-j)
		v := w[j]
		if v == 0 {
			continue
		}
		col := bp.at(j+1, j)
		for i := 0; i < km; i++ {
			w[j+1+i] -= ab[col+i] * v
		}
	}
	// U: back substitution, bandwidth kl + ku.
	kv := kl + ku
	for j := n - 1; j >= 0; j-- {
		v := w[j] / ab[bp.at(j, j)]
		w[j] = v
		if v == 0 {
			continue
		}
		for i := max(0, j-kv); i < j; i++ {
			w[i] -= ab[bp.at(i, j)] * v
		}
	}
	for a := 0; a < n; a++ {
		x[bp.perm[a]] = w[a]
	}
}

// solveT overwrites x with (g + t·c)⁻ᵀ·x (plain transpose, no
// conjugation).
func (bp *bandPencil) solveT(x, w []complex128) {
	n, kl, ku := bp.n, bp.kl, bp.ku
	kv := kl + ku
	for a := 0; a < n; a++ {
		w[a] = x[bp.perm[a]]
	}
	ab := bp.ab
	// Uᵀ: forward.
	for j := 0; j < n; j++ {
		s := w[j]
		for i := max(0, j-kv); i < j; i++ {
			s -= ab[bp.at(i, j)] * w[i]
		}
		w[j] = s / ab[bp.at(j, j)]
	}
	// Lᵀ: backward, then the interchanges in reverse.
	for j := n - 2; j >= 0; j-- {
		km := min(kl, n-1-j)
		col := bp.at(j+1, j)
		s := w[j]
		for i := 0; i < km; i++ {
			s -= ab[col+i] * w[j+1+i]
		}
		w[j] = s
		if p := bp.ipiv[j]; p != j {
			w[j], w[p] = w[p], w[j]
		}
	}
	for a := 0; a < n; a++ {
		x[bp.perm[a]] = w[a]
	}
}

// xnum is a complex number m·2^e with an exponent of its own, for
// solutions whose entries span more than float64's range: the unknowns
// of a 500-node ladder far above its poles fall from about 1 at the input
// to 2^−2000 at the output. m is kept normalized, its larger part in
// [0.5, 1).
type xnum struct {
	m complex128
	e int
}

func xnorm(m complex128, e int) xnum {
	a := math.Max(math.Abs(real(m)), math.Abs(imag(m)))
	if a == 0 || math.IsInf(a, 0) || math.IsNaN(a) {
		return xnum{m, e}
	}
	_, k := math.Frexp(a)
	return xnum{m * complex(math.Ldexp(1, -k), 0), e + k}
}

// sub returns x − y.
func (x xnum) sub(y xnum) xnum {
	switch {
	case y.m == 0:
		return x
	case x.m == 0:
		return xnum{-y.m, y.e}
	}
	// Both normalized: beyond 60 binary places one is below the other's
	// rounding.
	switch d := y.e - x.e; {
	case d > 60:
		return xnum{-y.m, y.e}
	case d < -60:
		return x
	default:
		return xnorm(x.m-y.m*complex(math.Ldexp(1, d), 0), x.e)
	}
}

// mul returns a·x for a float-range complex a.
func (x xnum) mul(a complex128) xnum { return xnorm(a*x.m, x.e) }

// solveX is solve on a vector of xnum, for the t of the last factor; w is
// workspace of length n.
func (bp *bandPencil) solveX(x, w []xnum) {
	n, kl, ku := bp.n, bp.kl, bp.ku
	for a := 0; a < n; a++ {
		w[a] = x[bp.perm[a]]
	}
	ab := bp.ab
	for j := 0; j < n-1; j++ {
		if p := bp.ipiv[j]; p != j {
			w[j], w[p] = w[p], w[j]
		}
		if w[j].m == 0 {
			continue
		}
		col := bp.at(j+1, j)
		for i := 0; i < min(kl, n-1-j); i++ {
			if l := ab[col+i]; l != 0 {
				w[j+1+i] = w[j+1+i].sub(w[j].mul(l))
			}
		}
	}
	kv := kl + ku
	for j := n - 1; j >= 0; j-- {
		w[j] = w[j].mul(1 / ab[bp.at(j, j)])
		if w[j].m == 0 {
			continue
		}
		for i := max(0, j-kv); i < j; i++ {
			if u := ab[bp.at(i, j)]; u != 0 {
				w[i] = w[i].sub(w[j].mul(u))
			}
		}
	}
	for a := 0; a < n; a++ {
		x[bp.perm[a]] = w[a]
	}
}
