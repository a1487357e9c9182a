package ac

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/mat"
)

// ErrSingularPencil is returned (wrapped) when det(G + s·C) is zero for
// every s, so that the pencil has no eigenvalues to speak of: a floating
// node, a loop of voltage sources, a cut-set of current sources.
var ErrSingularPencil = errors.New("ac: singular pencil: det(G + s·C) is zero for every s")

// scaledPencil is the pencil G + s·C after exact (power-of-two) balancing:
//
//	g + t·c = Dr·(G + s·C)·Dc,   g = Dr·G·Dc,   c = w0·Dr·C·Dc,   s = w0·t,
//
// with Dr, Dc diagonal. The eigenvalues are unchanged (up to the unit w0)
// and so are the solutions: x = Dc·x̃ where (g + t·c)·x̃ = Dr·b.
type scaledPencil struct {
	n      int
	g, c   []float64
	dr, dc []float64
	w0     float64 // rad/s per balanced frequency unit
}

// balance returns the balanced form of the pencil G + s·C.
//
// Circuit matrices mix units (siemens in node rows, dimensionless in branch
// rows, farads and henries against siemens) and values over many decades,
// which would make every rank decision and every condition estimate
// meaningless. The scaling, in the spirit of Ward's balancing of matrix
// pencils (SIAM J. Sci. Stat. Comput. 2, 1981), is:
//
//   - a frequency unit w0 making ‖G‖_F = ‖w0·C‖_F, so that the spectrum is
//     centred on |t| ≈ 1;
//   - row and column factors making every row and every column of the
//     stacked [g c] of unit 2-norm (alternating passes, Sinkhorn style),
//     then w0 once more and the passes again.
//
// Every factor is a power of two, so scaling adds no rounding error.
func balance(G, C mat.Matrix) (*scaledPencil, error) {
	g, n, nc := denseCopy(G)
	c, cr, cc := denseCopy(C)
	if n != nc || cr != n || cc != n {
		return nil, fmt.Errorf("ac: pencil: G is %d×%d and C is %d×%d, want both square of one size", n, nc, cr, cc)
	}
	for i := range g {
		if math.IsNaN(g[i]) || math.IsInf(g[i], 0) || math.IsNaN(c[i]) || math.IsInf(c[i], 0) {
			return nil, fmt.Errorf("ac: pencil: entry (%d, %d) is not finite", i/n, i%n)
		}
	}
	p := &scaledPencil{n: n, g: g, c: c, dr: make([]float64, n), dc: make([]float64, n), w0: 1}
	for i := 0; i < n; i++ {
		p.dr[i], p.dc[i] = 1, 1
	}
	// The passes run over the nonzero entries only: circuit matrices
	// have a few per row.
	type entry struct {
		i, j int
		g, c float64
	}
	var es []entry
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if g[i*n+j] != 0 || c[i*n+j] != 0 {
				es = append(es, entry{i, j, g[i*n+j], c[i*n+j]})
			}
		}
	}
	rowMax, colMax := make([]float64, n), make([]float64, n)
	rowSsq, colSsq := make([]float64, n), make([]float64, n)
	// norms sets rowSsq, colSsq to the 2-norms of the rows and columns
	// of [g c] (or of [g; c]), scaled by their largest entries so that
	// nothing under- or overflows.
	norms := func() {
		for i := 0; i < n; i++ {
			rowMax[i], colMax[i], rowSsq[i], colSsq[i] = 0, 0, 0, 0
		}
		for _, e := range es {
			v := math.Max(math.Abs(e.g), math.Abs(e.c))
			rowMax[e.i] = math.Max(rowMax[e.i], v)
			colMax[e.j] = math.Max(colMax[e.j], v)
		}
		for _, e := range es {
			a, b := e.g/rowMax[e.i], e.c/rowMax[e.i]
			rowSsq[e.i] += a*a + b*b
			a, b = e.g/colMax[e.j], e.c/colMax[e.j]
			colSsq[e.j] += a*a + b*b
		}
		for i := 0; i < n; i++ {
			rowSsq[i] = rowMax[i] * math.Sqrt(rowSsq[i])
			colSsq[i] = colMax[i] * math.Sqrt(colSsq[i])
		}
	}
	for round := 0; round < 2; round++ {
		var ng, ncn float64
		{
			var gm, cm float64
			for _, e := range es {
				gm, cm = math.Max(gm, math.Abs(e.g)), math.Max(cm, math.Abs(e.c))
			}
			var gs, cs float64
			for _, e := range es {
				if gm > 0 {
					gs += (e.g / gm) * (e.g / gm)
				}
				if cm > 0 {
					cs += (e.c / cm) * (e.c / cm)
				}
			}
			ng, ncn = gm*math.Sqrt(gs), cm*math.Sqrt(cs)
		}
		if ng > 0 && ncn > 0 {
			f := pow2(ng / ncn)
			for k := range es {
				es[k].c *= f
			}
			p.w0 *= f
		}
		for pass := 0; pass < 12; pass++ {
			changed := false
			norms()
			fr := make([]float64, n)
			for i := 0; i < n; i++ {
				fr[i] = 1
				if rowSsq[i] != 0 {
					fr[i] = pow2(1 / rowSsq[i])
				}
				if fr[i] != 1 {
					p.dr[i] *= fr[i]
					changed = true
				}
			}
			for k := range es {
				if f := fr[es[k].i]; f != 1 {
					es[k].g *= f
					es[k].c *= f
				}
			}
			norms()
			for j := 0; j < n; j++ {
				f := 1.0
				if colSsq[j] != 0 {
					f = pow2(1 / colSsq[j])
				}
				fr[j] = f
				if f != 1 {
					p.dc[j] *= f
					changed = true
				}
			}
			for k := range es {
				if f := fr[es[k].j]; f != 1 {
					es[k].g *= f
					es[k].c *= f
				}
			}
			if !changed {
				break
			}
		}
	}
	for _, e := range es {
		g[e.i*n+e.j], c[e.i*n+e.j] = e.g, e.c
	}
	return p, nil
}

// rebalance balances an already balanced pencil once more (after
// eliminate), keeping the frequency unit consistent.
func rebalance(p *scaledPencil) (*scaledPencil, error) {
	if p.n == 0 {
		return p, nil
	}
	q, err := balance(mat.NewDense(p.n, p.n, p.g), mat.NewDense(p.n, p.n, p.c))
	if err != nil {
		return nil, err
	}
	q.w0 *= p.w0
	return q, nil
}

// staircase is an orthogonal equivalence of the balanced pencil that
// splits off its infinite and zero eigenvalues exactly:
//
//	Uᵀ·(g + t·c)·V = gw + t·cw = [ P11(t)  P12(t) ]
//	                             [   0     P22(t) ]
//
// P11 is upper triangular of order ninf + nzero: its first ninf diagonal
// entries are nonzero constants (infinite eigenvalues) and the next nzero
// are t times nonzero constants (eigenvalues at t = 0). P22 = g2 + t·c2 has
// both g2 and c2 nonsingular, so all its eigenvalues are finite and
// nonzero. U and V are orthogonal.
//
// This is the staircase reduction of Van Dooren (The computation of
// Kronecker's canonical form of a singular pencil, Linear Algebra Appl. 27,
// 1979), restricted to a regular pencil: while the trailing c has a null
// space (a numerical one, found by column-pivoted QR), its columns are
// rotated to the front and the corresponding columns of g, which must have
// full rank for a regular pencil, are compressed by a QR factorization into
// a triangular block that is split off. The same with g and c swapped
// deflates the eigenvalues at zero. Circuit matrices mostly have exactly
// zero columns in the trailing c; those are moved by permutation, and the
// QR of the (sparse) column block of g only touches its nonzero rows, so
// that a pencil of index k costs about k·n² rather than k·n³.
type staircase struct {
	n           int
	ninf, nzero int
	gw, cw      []float64
	u, v        []float64
	work        []float64
}

// rankTol is the threshold below which a (column-pivoted) triangular
// factor's diagonal entry is taken for zero: n·epsilon·‖M‖_F, the size of
// the rounding errors that the orthogonal transformations leave in M,
// with a margin of √n over their expected size.
func rankTol(n int, m []float64) float64 {
	return rankTolFactor * float64(max(n, 1)) * epsilon * frob(m)
}

const (
	rankTolFactor = 1
	// looseTol (relative to ‖M‖_F, times n) and gapMin bound the
	// gap-based rank decision of compressColumns.
	looseTol = 1e-8 / epsilon
	gapMin   = 1e5
)

func newStaircase(p *scaledPencil) (*staircase, error) {
	n := p.n
	s := &staircase{
		n:  n,
		gw: append([]float64(nil), p.g...),
		cw: append([]float64(nil), p.c...),
		u:  identity(n),
		v:  identity(n),
	}
	tolG, tolC := rankTol(n, p.g), rankTol(n, p.c)
	o := 0
	for o < n {
		k, err := s.step(o, s.cw, s.gw, tolC, tolG)
		if err != nil {
			return nil, err
		}
		if k == 0 {
			break
		}
		o += k
	}
	s.ninf = o
	for o < n {
		k, err := s.step(o, s.gw, s.cw, tolG, tolC)
		if err != nil {
			return nil, err
		}
		if k == 0 {
			break
		}
		o += k
	}
	s.nzero = o - s.ninf
	return s, nil
}

// step deflates the null space (or part of it) of the trailing block of a
// (cw for infinite eigenvalues, gw for zero ones) at offset o, compressing
// the matching columns of b. It returns the number k of eigenvalues split
// off, 0 when a's trailing block is nonsingular.
func (s *staircase) step(o int, a, b []float64, tolA, tolB float64) (int, error) {
	n := s.n
	// Exactly (or numerically) zero columns of a's trailing block.
	var null []int
	for j := o; j < n; j++ {
		zero := true
		for i := o; i < n; i++ {
			if math.Abs(a[i*n+j]) > tolA {
				zero = false
				break
			}
		}
		if zero {
			null = append(null, j)
		}
	}
	k := len(null)
	if k > 0 {
		for idx, j := range null {
			s.swapCols(o+idx, j)
		}
		for i := o; i < n; i++ {
			for j := o; j < o+k; j++ {
				a[i*n+j] = 0
			}
		}
	} else {
		k = s.compressColumns(o, a, tolA)
		if k == 0 {
			return 0, nil
		}
	}

	// Row compression of b's columns o..o+k−1 over the rows where they are
	// nonzero, moved to the top of the trailing block first.
	var rows []int
	for i := o; i < n; i++ {
		for j := o; j < o+k; j++ {
			if b[i*n+j] != 0 {
				rows = append(rows, i)
				break
			}
		}
	}
	q := len(rows)
	if q < k {
		return 0, ErrSingularPencil
	}
	for idx, i := range rows {
		s.swapRows(o+idx, i)
	}
	blk := subCopy(b, n, o, o, q, k)
	jpvt := make([]int, k)
	for i := range jpvt {
		jpvt[i] = -1
	}
	tau := make([]float64, k)
	s.ensureWork(3*k + 1 + 64*(k+1))
	lp.Dgeqp3(q, k, blk, k, jpvt, tau, s.work, len(s.work))
	for j := 0; j < k; j++ {
		if math.Abs(blk[j*k+j]) <= tolB {
			return 0, ErrSingularPencil
		}
	}
	s.permuteCols(o, jpvt)
	s.ensureWork(64 * n)
	lp.Dormqr(blas.Left, blas.Trans, q, n-o, k, blk, k, tau, s.gw[o*n+o:], n, s.work, len(s.work))
	lp.Dormqr(blas.Left, blas.Trans, q, n-o, k, blk, k, tau, s.cw[o*n+o:], n, s.work, len(s.work))
	lp.Dormqr(blas.Right, blas.NoTrans, n, q, k, blk, k, tau, s.u[o:], n, s.work, len(s.work))
	for i := o; i < o+q; i++ {
		for j := o; j < o+k && j < i; j++ {
			b[i*n+j] = 0
		}
		for j := o; j < o+k; j++ {
			a[i*n+j] = 0
		}
	}
	return k, nil
}

// compressColumns finds the numerical null space of a's trailing block by
// a column-pivoted QR factorization of its transpose, rotates it to the
// leading columns (applying the rotation to gw, cw and V) and returns its
// dimension.
func (s *staircase) compressColumns(o int, a []float64, tol float64) int {
	n := s.n
	m := n - o
	t := make([]float64, m*m)
	for i := 0; i < m; i++ {
		for j := 0; j < m; j++ {
			t[j*m+i] = a[(o+i)*n+o+j]
		}
	}
	jpvt := make([]int, m)
	for i := range jpvt {
		jpvt[i] = -1
	}
	tau := make([]float64, m)
	s.ensureWork(3*m + 1 + 64*(m+1))
	lp.Dgeqp3(m, m, t, m, jpvt, tau, s.work, len(s.work))
	r := m
	for r > 0 && math.Abs(t[(r-1)*m+r-1]) <= tol {
		r--
	}
	// Rounding errors grow with each level of the staircase, so that a
	// null direction of a deep level may stand above tol. It is then
	// told by a gap: a drop of more than gapMin between consecutive
	// diagonal entries of R, below looseTol. Genuinely small entries (a
	// tiny capacitance) come in no such isolated gap after balancing:
	// poles spread over 12 decades give steps of about one decade.
	best, bestRatio := r, 0.0
	for j := r - 1; j >= 1 && math.Abs(t[j*m+j]) <= looseTol*tol/rankTolFactor; j-- {
		if ratio := math.Abs(t[(j-1)*m+j-1]) / math.Abs(t[j*m+j]); ratio > bestRatio {
			best, bestRatio = j, ratio
		}
	}
	if bestRatio >= gapMin {
		r = best
	}
	if r == m {
		return 0
	}
	// a_trail·Q = P·Rᵀ: the last m−r columns of Q span the null space.
	s.ensureWork(64 * m)
	lp.Dorgqr(m, m, m, t, m, tau, s.work, len(s.work))
	k := m - r
	vk := make([]float64, m*m)
	for i := 0; i < m; i++ {
		copy(vk[i*m:i*m+k], t[i*m+r:i*m+m])
		copy(vk[i*m+k:i*m+m], t[i*m:i*m+r])
	}
	tmp := make([]float64, n*m)
	for _, x := range [][]float64{s.gw, s.cw, s.v} {
		gemm(n, m, m, x[o:], n, vk, m, tmp, m)
		for i := 0; i < n; i++ {
			copy(x[i*n+o:i*n+n], tmp[i*m:(i+1)*m])
		}
	}
	for i := o; i < n; i++ {
		for j := o; j < o+k; j++ {
			a[i*n+j] = 0
		}
	}
	return k
}

func (s *staircase) ensureWork(l int) {
	if len(s.work) < l {
		s.work = make([]float64, l)
	}
}

// swapCols swaps columns i and j of gw, cw and V.
func (s *staircase) swapCols(i, j int) {
	if i == j {
		return
	}
	n := s.n
	for _, x := range [][]float64{s.gw, s.cw, s.v} {
		for r := 0; r < n; r++ {
			x[r*n+i], x[r*n+j] = x[r*n+j], x[r*n+i]
		}
	}
}

// swapRows swaps rows i and j of gw and cw and columns i and j of U.
func (s *staircase) swapRows(i, j int) {
	if i == j {
		return
	}
	n := s.n
	for _, x := range [][]float64{s.gw, s.cw} {
		ri, rj := x[i*n:(i+1)*n], x[j*n:(j+1)*n]
		for c := range ri {
			ri[c], rj[c] = rj[c], ri[c]
		}
	}
	for r := 0; r < n; r++ {
		s.u[r*n+i], s.u[r*n+j] = s.u[r*n+j], s.u[r*n+i]
	}
}

// permuteCols reorders columns o..o+len(p)−1 of gw, cw and V so that new
// column o+j is old column o+p[j].
func (s *staircase) permuteCols(o int, p []int) {
	n, k := s.n, len(p)
	tmp := make([]float64, k)
	for _, x := range [][]float64{s.gw, s.cw, s.v} {
		for r := 0; r < n; r++ {
			row := x[r*n+o : r*n+o+k]
			for j := 0; j < k; j++ {
				tmp[j] = row[p[j]]
			}
			copy(row, tmp)
		}
	}
}
