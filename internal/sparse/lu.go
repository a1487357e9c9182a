package sparse

import (
	"fmt"
	"math"
)

// Pivot thresholds. AnalysisThreshold is the u of the threshold test used
// when a pivot order is chosen: 0.1 is the customary compromise between
// sparsity and stability (Duff, Erisman and Reid, from memory).
// RefactorThreshold is the weaker test a refactorization applies to the
// pivots of the order it reuses: below it, the order is chosen anew from
// the current values. The gap keeps a Newton iteration from re-analysing
// whenever a conductance moves by a decade.
const (
	AnalysisThreshold = 0.1
	RefactorThreshold = 1e-3
)

// SingularError reports a matrix that could not be factored: no pivot
// passing the threshold test was left among Rows and Cols (original
// indices, ascending), which remain unfactored. Structural is true when
// those rows and columns hold no slot at all (no values can help).
type SingularError struct {
	Rows, Cols []int
	Structural bool
}

func (e *SingularError) Error() string {
	kind := "numerically"
	if e.Structural {
		kind = "structurally"
	}
	return fmt.Sprintf("sparse: matrix is %s singular (%d rows and columns left without a pivot, e.g. row %d, column %d)",
		kind, len(e.Rows), first(e.Rows), first(e.Cols))
}

func first(s []int) int {
	if len(s) == 0 {
		return -1
	}
	return s[0]
}

// LU is the factorization P·A·Q = L·U of a Matrix. The zero value is ready
// to use. Step k of the elimination pivots on row RowPerm[k] and column
// ColPerm[k] of A; L and U are stored by rows in step numbering.
type LU struct {
	n    int
	m    *Matrix // the matrix the order was analysed for
	done bool    // a pivot order exists for m's pattern

	rowPerm, colPerm []int // step → original row, column
	colStep          []int // original column → step

	// Rows of P·A·Q: for step k, aSlot[aStart[k]:aStart[k+1]] are the
	// slots of A's row rowPerm[k] and aCol the steps of their columns.
	aStart, aSlot, aCol []int
	// L (unit diagonal not stored): row k has columns lCol[lStart[k]:lStart[k+1]]
	// in ascending order.
	lStart, lCol []int
	lVal         []float64
	// U without the diagonal: row k has columns uCol[uStart[k]:uStart[k+1]] (all > k).
	uStart, uCol []int
	uVal         []float64
	uDiag        []float64

	w []float64 // dense work row, length n

	// Analyses counts the pivot-order analyses done (the first one and
	// every re-analysis forced by a tiny pivot).
	Analyses int
}

// Factor computes the factorization of m. The first call, a call with a
// matrix of another pattern, or a refactorization meeting a pivot below
// RefactorThreshold of its row analyses a new pivot order from m's current
// values; other calls reuse the order and allocate nothing. A matrix with
// no acceptable pivot left gives a *SingularError.
func (f *LU) Factor(m *Matrix) error {
	if f.done && f.m != nil && sameMatrixPattern(f.m, m) {
		if f.refactor(m) {
			return nil
		}
	}
	return f.analyse(m)
}

// sameMatrixPattern reports whether b has a's pattern: the same matrix,
// or a Clone of it (clones share the position slices).
func sameMatrixPattern(a, b *Matrix) bool {
	if a == b {
		return true
	}
	return a.n == b.n && len(a.rows) == len(b.rows) &&
		(len(a.rows) == 0 || &a.rows[0] == &b.rows[0])
}

// refactor redoes the arithmetic of the stored pivot order (row-by-row
// Doolittle elimination on a dense work row). It reports false when a
// pivot fails the refactor threshold.
func (f *LU) refactor(m *Matrix) bool {
	w := f.w
	for k := 0; k < f.n; k++ {
		l0, l1 := f.lStart[k], f.lStart[k+1]
		u0, u1 := f.uStart[k], f.uStart[k+1]
		for _, j := range f.lCol[l0:l1] {
			w[j] = 0
		}
		for _, j := range f.uCol[u0:u1] {
			w[j] = 0
		}
		w[k] = 0
		for p := f.aStart[k]; p < f.aStart[k+1]; p++ {
			w[f.aCol[p]] += m.Values[f.aSlot[p]]
		}
		for p := l0; p < l1; p++ {
			c := f.lCol[p]
			l := w[c] / f.uDiag[c]
			f.lVal[p] = l
			if l == 0 {
				continue
			}
			for q := f.uStart[c]; q < f.uStart[c+1]; q++ {
				w[f.uCol[q]] -= l * f.uVal[q]
			}
		}
		piv := w[k]
		big := math.Abs(piv)
		for p := u0; p < u1; p++ {
			v := w[f.uCol[p]]
			f.uVal[p] = v
			if a := math.Abs(v); a > big {
				big = a
			}
		}
		if piv == 0 || math.IsNaN(piv) || math.Abs(piv) < RefactorThreshold*big {
			return false
		}
		f.uDiag[k] = piv
	}
	return true
}

// Solve sets x to the solution of A·x = b for the last factored A. b and x
// may be the same slice. It allocates nothing.
func (f *LU) Solve(x, b []float64) {
	y := f.w
	for k := 0; k < f.n; k++ {
		s := b[f.rowPerm[k]]
		for p := f.lStart[k]; p < f.lStart[k+1]; p++ {
			s -= f.lVal[p] * y[f.lCol[p]]
		}
		y[k] = s
	}
	for k := f.n - 1; k >= 0; k-- {
		s := y[k]
		for p := f.uStart[k]; p < f.uStart[k+1]; p++ {
			s -= f.uVal[p] * y[f.uCol[p]]
		}
		y[k] = s / f.uDiag[k]
	}
	for k := 0; k < f.n; k++ {
		x[f.colPerm[k]] = y[k]
	}
}

// Fill returns the number of entries of L and U (diagonal included).
func (f *LU) Fill() int { return len(f.lCol) + len(f.uCol) + f.n }

// arena hands out int slices carved from one allocation.
type arena []int

func (a *arena) take(n int) []int {
	if n > len(*a) {
		*a = make([]int, n)
	}
	s := (*a)[:n:n]
	*a = (*a)[n:]
	return s
}

// countList keeps the active rows (or columns) in doubly linked lists by
// their count of active entries, so that the Markowitz search can visit
// the sparsest first.
type countList struct {
	head, next, prev, count []int
}

func newCountList(n int, ar *arena) countList {
	c := countList{head: ar.take(n + 2), next: ar.take(n), prev: ar.take(n), count: ar.take(n)}
	for i := range c.head {
		c.head[i] = -1
	}
	return c
}

func (c *countList) insert(i, cnt int) {
	if cnt >= len(c.head) {
		cnt = len(c.head) - 1
	}
	c.count[i] = cnt
	c.prev[i] = -1
	c.next[i] = c.head[cnt]
	if c.head[cnt] >= 0 {
		c.prev[c.head[cnt]] = i
	}
	c.head[cnt] = i
}

func (c *countList) remove(i int) {
	if c.prev[i] >= 0 {
		c.next[c.prev[i]] = c.next[i]
	} else {
		c.head[c.count[i]] = c.next[i]
	}
	if c.next[i] >= 0 {
		c.prev[c.next[i]] = c.prev[i]
	}
}

func (c *countList) set(i, cnt int) {
	c.remove(i)
	c.insert(i, cnt)
}

// analysis is the state of one pivot-order analysis: the active
// submatrix by rows (columns and values) and, for the search, the rows of
// each column (lazily pruned of rows that left the active submatrix).
type analysis struct {
	n         int
	rowCols   [][]int
	rowVals   [][]float64
	rowMax    []float64 // max |a_ij| over the active row
	colRows   [][]int
	rowActive []bool
	colActive []bool
	rl, cl    countList
}

// rowSlack is the spare capacity given to each row for fill-in before it
// must grow; circuit rows rarely gain more.
const rowSlack = 4

func newAnalysis(m *Matrix, ar *arena) *analysis {
	n := m.n
	active := make([]bool, 2*n)
	floats := make([]float64, n+len(m.rows)+rowSlack*n)
	a := &analysis{
		n: n, rowCols: make([][]int, n), rowVals: make([][]float64, n), rowMax: floats[:n:n],
		colRows: make([][]int, n), rowActive: active[:n:n], colActive: active[n:],
		rl: newCountList(n, ar), cl: newCountList(n, ar),
	}
	colSlab := ar.take(len(m.rows) + rowSlack*n)
	valSlab := floats[n:]
	colCount := ar.take(n)
	for _, j := range m.cols {
		colCount[j]++
	}
	rowsSlab := ar.take(len(m.rows) + rowSlack*n)
	off := 0
	for j := 0; j < n; j++ {
		a.colRows[j] = rowsSlab[off : off : off+colCount[j]+rowSlack]
		off += colCount[j] + rowSlack
	}
	off = 0
	for i := 0; i < n; i++ {
		slots := m.RowSlots(i)
		c := colSlab[off : off+len(slots) : off+len(slots)+rowSlack]
		v := valSlab[off : off+len(slots) : off+len(slots)+rowSlack]
		off += len(slots) + rowSlack
		var big float64
		for p, s := range slots {
			j := m.cols[s]
			c[p] = j
			v[p] = m.Values[s]
			if x := math.Abs(v[p]); x > big {
				big = x
			}
			a.colRows[j] = append(a.colRows[j], i)
		}
		a.rowCols[i], a.rowVals[i], a.rowMax[i] = c, v, big
	}
	for i := n - 1; i >= 0; i-- { // reverse, so that each list starts with its lowest index
		a.rowActive[i], a.colActive[i] = true, true
		a.rl.insert(i, len(a.rowCols[i]))
		a.cl.insert(i, len(a.colRows[i]))
	}
	return a
}

func (a *analysis) valueAt(i, j int) float64 {
	for p, c := range a.rowCols[i] {
		if c == j {
			return a.rowVals[i][p]
		}
	}
	return 0
}

// analyse chooses a pivot order from m's values (restricted Markowitz with
// the threshold test), factors m on the way, and lays out the static
// structures that refactor reuses.
func (f *LU) analyse(m *Matrix) error {
	n := m.n
	f.Analyses++
	f.done = false
	nnz := len(m.rows)
	// All int arrays of the analysis and of the result come from one
	// allocation (the lists that grow with fill may move out of it).
	ar := arena(make([]int, (18+2*rowSlack)*n+9*nnz+8))
	a := newAnalysis(m, &ar)
	pos := ar.take(n) // scatter: column → position in the row being updated, −1 none
	for i := range pos {
		pos[i] = -1
	}
	rowPerm := ar.take(n)
	colPerm := ar.take(n)
	// L entries as (original row, step, value), in step order.
	lRow, lStep := ar.take(nnz)[:0], ar.take(nnz)[:0]
	lVal := make([]float64, 0, nnz)
	// U rows by step, original column numbers: uc[us[k]:us[k+1]].
	us := ar.take(n + 1)
	uc := ar.take(nnz)[:0]
	uv := make([]float64, 0, nnz)
	uDiag := make([]float64, n)

	for k := 0; k < n; k++ {
		p, q, ok := a.search()
		if !ok {
			return a.singular()
		}
		rowPerm[k], colPerm[k] = p, q
		a.rowActive[p], a.colActive[q] = false, false
		a.rl.remove(p)
		a.cl.remove(q)
		// The pivot row leaves the active submatrix: it becomes U's row k.
		var piv float64
		for t, j := range a.rowCols[p] {
			if j == q {
				piv = a.rowVals[p][t]
				continue
			}
			uc = append(uc, j)
			uv = append(uv, a.rowVals[p][t])
			a.cl.set(j, a.cl.count[j]-1)
		}
		us[k+1] = len(uc)
		uDiag[k] = piv
		ucols, uvals := uc[us[k]:], uv[us[k]:]
		// Eliminate column q from the other active rows.
		for _, i := range a.colRows[q] {
			if !a.rowActive[i] {
				continue
			}
			rc, rv := a.rowCols[i], a.rowVals[i]
			var aiq float64
			for t, j := range rc {
				if j == q {
					aiq = rv[t]
					last := len(rc) - 1
					rc[t], rv[t] = rc[last], rv[last]
					rc, rv = rc[:last], rv[:last]
					break
				}
			}
			l := aiq / piv
			lRow = append(lRow, i)
			lStep = append(lStep, k)
			lVal = append(lVal, l)
			for t, j := range rc {
				pos[j] = t
			}
			for t, j := range ucols {
				if pt := pos[j]; pt >= 0 {
					rv[pt] -= l * uvals[t]
					continue
				}
				pos[j] = len(rc)
				rc = append(rc, j)
				rv = append(rv, -l*uvals[t])
				a.colRows[j] = append(a.colRows[j], i)
				a.cl.set(j, a.cl.count[j]+1)
			}
			var big float64
			for t, j := range rc {
				pos[j] = -1
				if x := math.Abs(rv[t]); x > big {
					big = x
				}
			}
			a.rowCols[i], a.rowVals[i], a.rowMax[i] = rc, rv, big
			a.rl.set(i, len(rc))
		}
		a.colRows[q] = nil
	}

	// Lay out the static structures in step numbering.
	f.n, f.m = n, m
	f.rowPerm, f.colPerm = rowPerm, colPerm
	f.colStep = ar.take(n)
	rowStep := ar.take(n)
	for k := range colPerm {
		f.colStep[colPerm[k]] = k
		rowStep[rowPerm[k]] = k
	}
	f.aStart = ar.take(n + 1)
	f.aSlot = ar.take(nnz)[:0]
	f.aCol = ar.take(nnz)[:0]
	for k := 0; k < n; k++ {
		for _, s := range m.RowSlots(rowPerm[k]) {
			f.aSlot = append(f.aSlot, s)
			f.aCol = append(f.aCol, f.colStep[m.cols[s]])
		}
		f.aStart[k+1] = len(f.aSlot)
	}
	// L by rows in step numbering: a counting sort of the entries, which
	// keeps each row's steps ascending.
	f.lStart = ar.take(n + 1)
	for _, i := range lRow {
		f.lStart[rowStep[i]+1]++
	}
	for k := 0; k < n; k++ {
		f.lStart[k+1] += f.lStart[k]
	}
	f.lCol = ar.take(len(lRow))
	f.lVal = make([]float64, len(lRow))
	next := ar.take(n)
	copy(next, f.lStart[:n])
	for e, i := range lRow {
		k := rowStep[i]
		f.lCol[next[k]] = lStep[e]
		f.lVal[next[k]] = lVal[e]
		next[k]++
	}
	f.uStart = us
	f.uCol = ar.take(len(uc))
	for t, j := range uc {
		f.uCol[t] = f.colStep[j]
	}
	f.uVal = uv
	f.uDiag = uDiag
	if len(f.w) != n {
		f.w = make([]float64, n)
	}
	f.done = true
	return nil
}

// searchLimit is how many rows and columns the pivot search visits once
// it holds a candidate. Searching a few of the sparsest lines instead of
// all of them costs little fill and keeps the analysis near linear in the
// number of entries (Z. Zlatev, SIAM J. Numer. Anal. 17(1), 1980, from
// memory).
const searchLimit = 4

// search returns the pivot (row p, column q) of least Markowitz cost
// (r−1)·(c−1) among the entries passing the threshold test, visiting rows
// and columns in order of increasing count and stopping as soon as no
// unvisited entry can cost less, or searchLimit lines after the first
// candidate. Ties keep the first candidate found, or the larger
// |a_ij|/max_k|a_ik|, so the order is deterministic.
func (a *analysis) search() (p, q int, ok bool) {
	best := math.MaxInt
	bestRatio := 0.0
	visited := 0
	for c := 1; c <= a.n; c++ {
		// Columns with c active entries.
		for j := a.cl.head[c]; j >= 0; j = a.cl.next[j] {
			live := a.colRows[j][:0]
			for _, i := range a.colRows[j] {
				if a.rowActive[i] {
					live = append(live, i)
				}
			}
			a.colRows[j] = live
			cc := c - 1
			for _, i := range live {
				v := math.Abs(a.valueAt(i, j))
				if v == 0 || !(v >= AnalysisThreshold*a.rowMax[i]) {
					continue
				}
				cost := (a.rl.count[i] - 1) * cc
				ratio := v / a.rowMax[i]
				if cost < best || (cost == best && ratio > bestRatio) {
					best, bestRatio, p, q, ok = cost, ratio, i, j, true
				}
			}
			if ok {
				visited++
				if best <= cc*cc || visited >= searchLimit {
					return p, q, true
				}
			}
		}
		// Rows with c active entries.
		for i := a.rl.head[c]; i >= 0; i = a.rl.next[i] {
			rmax := a.rowMax[i]
			cr := c - 1
			for t, j := range a.rowCols[i] {
				v := math.Abs(a.rowVals[i][t])
				if v == 0 || !(v >= AnalysisThreshold*rmax) {
					continue
				}
				cost := cr * (a.cl.count[j] - 1)
				ratio := v / rmax
				if cost < best || (cost == best && ratio > bestRatio) {
					best, bestRatio, p, q, ok = cost, ratio, i, j, true
				}
			}
			if ok {
				visited++
				if best <= cr*cr || visited >= searchLimit {
					return p, q, true
				}
			}
		}
		if ok && best <= c*c {
			return p, q, true
		}
	}
	return p, q, ok
}

// singular builds the error for the rows and columns left active.
func (a *analysis) singular() error {
	e := &SingularError{}
	for i, act := range a.rowActive {
		if act {
			e.Rows = append(e.Rows, i)
			if len(a.rowCols[i]) == 0 {
				e.Structural = true
			}
		}
	}
	for j, act := range a.colActive {
		if !act {
			continue
		}
		e.Cols = append(e.Cols, j)
		live := false
		for _, i := range a.colRows[j] {
			live = live || a.rowActive[i]
		}
		if !live {
			e.Structural = true
		}
	}
	return e
}
