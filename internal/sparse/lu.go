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

	// Index arrays are int32, like Matrix's.
	rowPerm, colPerm []int32 // step → original row, column
	colStep          []int32 // original column → step

	// Rows of P·A·Q: for step k, aSlot[aStart[k]:aStart[k+1]] are the
	// slots of A's row rowPerm[k] and aCol the steps of their columns.
	aStart, aSlot, aCol []int32
	// Fill of row k: the steps of L and U's row k (diagonal included)
	// where A's row has no entry, zCol[zStart[k]:zStart[k+1]].
	zStart, zCol []int32
	// L (unit diagonal not stored): row k has columns lCol[lStart[k]:lStart[k+1]]
	// in ascending order.
	lStart, lCol []int32
	lVal         []float64
	// U without the diagonal: row k has columns uCol[uStart[k]:uStart[k+1]] (all > k).
	uStart, uCol []int32
	uVal         []float64
	uDiag        []float64

	w []float64 // dense work row, length n

	// Rows whose inputs did not change keep their factors: aPrev holds
	// the values of A (in aSlot order) the factors were last computed
	// from by refactor, and rowChanged marks the rows the current
	// refactor recomputed. Factors from an analysis are always
	// recomputed once (aValid false): the analysis orders its arithmetic
	// differently, which can leave a zero of the other sign.
	aPrev      []float64
	rowChanged []int32 // 1: recomputed
	aValid     bool

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
// pivot fails the refactor threshold. The work row starts as A's row: its
// entries are written as 0 + a_ij (the sum a zeroed row would hold, sign
// of zero included) and only the fill positions are zeroed.
//
// A row whose entries of A are bitwise those of the last refactor, and
// whose L entries refer only to rows that were not recomputed either, has
// exactly the factors it had: it is skipped. In a Newton iteration these
// are the rows of the linear parts that no device reaches.
func (f *LU) refactor(m *Matrix) bool {
	w := f.w
	vals := m.Values
	lStart, lCol, lVal := f.lStart, f.lCol, f.lVal
	uStart, uCol, uVal, uDiag := f.uStart, f.uCol, f.uVal, f.uDiag
	aPrev, changed := f.aPrev, f.rowChanged
	valid := f.aValid
	f.aValid = false // until this refactor completes
	for k := 0; k < f.n; k++ {
		a0, a1 := f.aStart[k], f.aStart[k+1]
		aCol, aSlot, prev := f.aCol[a0:a1], f.aSlot[a0:a1], aPrev[a0:a1]
		l0, l1 := lStart[k], lStart[k+1]
		if valid {
			same := true
			for p, s := range aSlot {
				if math.Float64bits(vals[s]) != math.Float64bits(prev[p]) {
					same = false
					break
				}
			}
			if same {
				for _, c := range lCol[l0:l1] {
					if changed[c] != 0 {
						same = false
						break
					}
				}
			}
			if same {
				changed[k] = 0
				continue
			}
			changed[k] = 1
		}
		for _, j := range f.zCol[f.zStart[k]:f.zStart[k+1]] {
			w[j] = 0
		}
		for p, s := range aSlot {
			v := vals[s]
			prev[p] = v
			w[aCol[p]] = 0 + v
		}
		lv := lVal[l0:l1]
		for p, c := range lCol[l0:l1] {
			l := w[c] / uDiag[c]
			lv[p] = l
			if l == 0 {
				continue
			}
			q0, q1 := uStart[c], uStart[c+1]
			uv := uVal[q0:q1]
			for q, j := range uCol[q0:q1] {
				w[j] -= l * uv[q]
			}
		}
		piv := w[k]
		big := math.Abs(piv)
		u0, u1 := uStart[k], uStart[k+1]
		uv := uVal[u0:u1]
		for p, j := range uCol[u0:u1] {
			v := w[j]
			uv[p] = v
			if a := math.Abs(v); a > big {
				big = a
			}
		}
		if piv == 0 || math.IsNaN(piv) || math.Abs(piv) < RefactorThreshold*big {
			return false
		}
		uDiag[k] = piv
	}
	if !valid {
		for k := range changed {
			changed[k] = 1
		}
	}
	f.aValid = true
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

// arena hands out slices carved from one allocation.
type arena[T any] []T

func (a *arena[T]) take(n int) []T {
	if n > len(*a) {
		*a = make([]T, n)
	}
	s := (*a)[:n:n]
	*a = (*a)[n:]
	return s
}

// countList keeps the active rows (or columns) in doubly linked lists by
// their count of active entries, so that the Markowitz search can visit
// the sparsest first.
type countList struct {
	head, next, prev, count []int32
}

func newCountList(n int, ar *arena[int32]) countList {
	c := countList{head: ar.take(n + 2), next: ar.take(n), prev: ar.take(n), count: ar.take(n)}
	for i := range c.head {
		c.head[i] = -1
	}
	return c
}

func (c *countList) insert(i, cnt int32) {
	if int(cnt) >= len(c.head) {
		cnt = int32(len(c.head) - 1)
	}
	c.count[i] = cnt
	c.prev[i] = -1
	c.next[i] = c.head[cnt]
	if c.head[cnt] >= 0 {
		c.prev[c.head[cnt]] = i
	}
	c.head[cnt] = i
}

func (c *countList) remove(i int32) {
	if c.prev[i] >= 0 {
		c.next[c.prev[i]] = c.next[i]
	} else {
		c.head[c.count[i]] = c.next[i]
	}
	if c.next[i] >= 0 {
		c.prev[c.next[i]] = c.prev[i]
	}
}

func (c *countList) set(i, cnt int32) {
	c.remove(i)
	c.insert(i, cnt)
}

// lines is a set of growable int32 lists (the rows or the columns of the
// active submatrix) in one slab: list k is at[k] … at[k]+size[k] of items,
// with room for room[k] items there. A list that outgrows its room moves to
// the end of the slab (appending to the slab may move the slab itself).
type lines struct {
	at, size, room []int32
	items          []int32
	vals           []float64 // parallel to items, or nil
}

// list returns the items of list k.
func (l *lines) list(k int32) []int32 {
	a := l.at[k]
	return l.items[a : a+l.size[k]]
}

// values returns the values of list k.
func (l *lines) values(k int32) []float64 {
	a := l.at[k]
	return l.vals[a : a+l.size[k]]
}

// full reports whether list k has no room left for another item.
func (l *lines) full(k int32) bool { return l.size[k] == l.room[k] }

// grow returns the lines with list k moved to the end of the slab, with
// room for twice its items and rowSlack more. (It returns the lines
// rather than updating them in place so that a slab on the stack stays
// there.)
func (l lines) grow(k int32) lines {
	a, sz := l.at[k], l.size[k]
	room := 2*sz + rowSlack
	at := int32(len(l.items))
	l.items = append(l.items, l.items[a:a+sz]...)
	l.items = append(l.items, make([]int32, room-sz)...)
	if l.vals != nil {
		l.vals = append(l.vals, l.vals[a:a+sz]...)
		l.vals = append(l.vals, make([]float64, room-sz)...)
	}
	l.at[k], l.room[k] = at, room
	return l
}

// push appends item (and value v, if the lines have values) to list k,
// which must not be full.
func (l *lines) push(k, item int32, v float64) {
	p := l.at[k] + l.size[k]
	l.items[p] = item
	if l.vals != nil {
		l.vals[p] = v
	}
	l.size[k]++
}

// analysis is the state of one pivot-order analysis: the active
// submatrix by rows (columns and values) and, for the search, the rows of
// each column (lazily pruned of rows that left the active submatrix).
// Indices are int32 to halve the memory the analysis touches.
type analysis struct {
	n         int
	rows      lines     // row i: its active columns and their values
	rowMax    []float64 // max |a_ij| over the active row
	cols      lines     // column j: rows that have (or had) an entry in it
	rowActive []int32   // 1: the row is active (int32, to share the arena)
	colActive []int32
	rl, cl    countList
}

// rowSlack is the spare room given to each row and column for fill-in
// before it must move; circuit rows rarely gain more.
const rowSlack = 4

// newAnalysis sets up the analysis of m, carving its arrays from the
// arenas.
func newAnalysis(m *Matrix, ar *arena[int32], fr *arena[float64]) analysis {
	n := m.n
	nnz := len(m.rows)
	active := ar.take(2 * n)
	a := analysis{
		n: n, rowMax: fr.take(n), rowActive: active[:n:n], colActive: active[n:],
		rl: newCountList(n, ar), cl: newCountList(n, ar),
	}
	a.rows = lines{at: ar.take(n), size: ar.take(n), room: ar.take(n),
		items: ar.take(nnz + rowSlack*n), vals: fr.take(nnz + rowSlack*n)}
	a.cols = lines{at: ar.take(n), size: ar.take(n), room: ar.take(n),
		items: ar.take(nnz + rowSlack*n)}
	for _, j := range m.cols {
		a.cols.room[j]++
	}
	off := int32(0)
	for j := 0; j < n; j++ {
		a.cols.at[j] = off
		a.cols.room[j] += rowSlack
		off += a.cols.room[j]
	}
	off = 0
	for i := 0; i < n; i++ {
		slots := m.RowSlots(i)
		a.rows.at[i], a.rows.size[i], a.rows.room[i] = off, int32(len(slots)), int32(len(slots)+rowSlack)
		c := a.rows.items[off : off+int32(len(slots))]
		v := a.rows.vals[off : off+int32(len(slots))]
		off += int32(len(slots) + rowSlack)
		var big float64
		for p, s := range slots {
			j := m.cols[s]
			c[p] = int32(j)
			v[p] = m.Values[s]
			if x := math.Abs(v[p]); x > big {
				big = x
			}
			a.cols.items[a.cols.at[j]+a.cols.size[j]] = int32(i)
			a.cols.size[j]++
		}
		a.rowMax[i] = big
	}
	for i := n - 1; i >= 0; i-- { // reverse, so that each list starts with its lowest index
		a.rowActive[i], a.colActive[i] = 1, 1
		a.rl.insert(int32(i), a.rows.size[i])
		a.cl.insert(int32(i), a.cols.size[i])
	}
	return a
}

func (a *analysis) valueAt(i, j int32) float64 {
	for p, c := range a.rows.list(i) {
		if c == j {
			return a.rows.vals[a.rows.at[i]+int32(p)]
		}
	}
	return 0
}

// Sizes of the stack buffers for an analysis's temporaries: enough for
// circuits of about a hundred unknowns (a few tens of kilobytes of
// stack), which then need no heap for them.
const (
	stackInts   = 3072
	stackFloats = 1024
)

// analyse chooses a pivot order from m's values (restricted Markowitz with
// the threshold test), factors m on the way, and lays out the static
// structures that refactor reuses.
func (f *LU) analyse(m *Matrix) error {
	n := m.n
	f.Analyses++
	f.done = false
	nnz := len(m.rows)
	// Temporaries: every int32 array from one buffer and every float64
	// array from another, on the stack when they fit (lists that grow
	// with fill may move out of them). L and U share nnz − n + fill
	// entries: each gets room for about half of them and the fill of a
	// few per row before it must grow.
	half := max(nnz-n, 0)/2 + n
	var ibuf [stackInts]int32
	var fbuf [stackFloats]float64
	ar := arena[int32](ibuf[:])
	if need := 30*n + 2*nnz + 3*half + 5; need > len(ar) {
		ar = make([]int32, need)
	}
	fr := arena[float64](fbuf[:])
	if need := 6*n + nnz + 2*half; need > len(fr) {
		fr = make([]float64, need)
	}
	a := newAnalysis(m, &ar, &fr)
	pos := ar.take(n) // scatter: column → position in the row being updated, −1 none
	for i := range pos {
		pos[i] = -1
	}
	// L entries as (original row, step, value), in step order.
	lRow, lStep := ar.take(half)[:0], ar.take(half)[:0]
	lVal := fr.take(half)[:0]
	// U rows by step, original column numbers: uc[us[k]:us[k+1]].
	uc := ar.take(half)[:0]
	uv := fr.take(half)[:0]
	us := ar.take(n + 1)
	uDiag := fr.take(n)
	rowPerm, colPerm := ar.take(n), ar.take(n)

	for k := 0; k < n; k++ {
		p, q, ok := a.search()
		if !ok {
			return a.singular()
		}
		rowPerm[k], colPerm[k] = p, q
		a.rowActive[p], a.colActive[q] = 0, 0
		a.rl.remove(p)
		a.cl.remove(q)
		// The pivot row leaves the active submatrix: it becomes U's row k.
		var piv float64
		pv := a.rows.values(p)
		for t, j := range a.rows.list(p) {
			if j == q {
				piv = pv[t]
				continue
			}
			uc = append(uc, j)
			uv = append(uv, pv[t])
			a.cl.set(j, a.cl.count[j]-1)
		}
		us[k+1] = int32(len(uc))
		uDiag[k] = piv
		ucols, uvals := uc[us[k]:], uv[us[k]:]
		// Eliminate column q from the other active rows.
		for _, i := range a.cols.list(q) {
			if a.rowActive[i] == 0 {
				continue
			}
			rc, rv := a.rows.list(i), a.rows.values(i)
			var aiq float64
			for t, j := range rc {
				if j == q {
					aiq = rv[t]
					last := len(rc) - 1
					rc[t], rv[t] = rc[last], rv[last]
					a.rows.size[i]--
					break
				}
			}
			l := aiq / piv
			lRow = append(lRow, i)
			lStep = append(lStep, int32(k))
			lVal = append(lVal, l)
			for t, j := range a.rows.list(i) {
				pos[j] = int32(t)
			}
			for t, j := range ucols {
				if pt := pos[j]; pt >= 0 {
					a.rows.vals[a.rows.at[i]+pt] -= l * uvals[t]
					continue
				}
				pos[j] = a.rows.size[i]
				if a.rows.full(i) {
					a.rows = a.rows.grow(i)
				}
				a.rows.push(i, j, -l*uvals[t])
				if a.cols.full(j) {
					a.cols = a.cols.grow(j)
				}
				a.cols.push(j, i, 0)
				a.cl.set(j, a.cl.count[j]+1)
			}
			var big float64
			rv = a.rows.values(i)
			for t, j := range a.rows.list(i) {
				pos[j] = -1
				if x := math.Abs(rv[t]); x > big {
					big = x
				}
			}
			a.rowMax[i] = big
			a.rl.set(i, a.rows.size[i])
		}
		a.cols.size[q] = 0
	}
	f.layout(m, rowPerm, colPerm, lRow, lStep, lVal, us, uc, uv, uDiag, &ar)
	return nil
}

// layout lays out the static structures of the factorization in step
// numbering from the analysis's results: the pivot order, L's entries as
// (original row, step, value) in step order, and U's rows by step with
// original column numbers, uc[us[k]:us[k+1]]. The structures that persist
// take one int and one float64 allocation.
func (f *LU) layout(m *Matrix, rowPerm, colPerm, lRow, lStep []int32, lVal []float64,
	us, uc []int32, uv, uDiag []float64, ar *arena[int32]) {
	n, nnz, nl, nu := m.n, len(m.rows), len(lRow), len(uc)
	nz := n + nl + nu - nnz // fill, exact: A's entries are a subset of L, U and the diagonal
	ir := arena[int32](make([]int32, 8*n+4+2*nnz+nl+nu+nz))
	fv := arena[float64](make([]float64, nl+nu+2*n+nnz))
	f.n, f.m = n, m
	f.rowPerm, f.colPerm = ir.take(n), ir.take(n)
	copy(f.rowPerm, rowPerm)
	copy(f.colPerm, colPerm)
	f.colStep = ir.take(n)
	rowStep := ar.take(n)
	for k := 0; k < n; k++ {
		f.colStep[colPerm[k]] = int32(k)
		rowStep[rowPerm[k]] = int32(k)
	}
	f.aStart = ir.take(n + 1)
	f.aSlot = ir.take(nnz)[:0]
	f.aCol = ir.take(nnz)[:0]
	for k := 0; k < n; k++ {
		for _, s := range m.RowSlots(int(rowPerm[k])) {
			f.aSlot = append(f.aSlot, s)
			f.aCol = append(f.aCol, f.colStep[m.cols[s]])
		}
		f.aStart[k+1] = int32(len(f.aSlot))
	}
	// L by rows in step numbering: a counting sort of the entries, which
	// keeps each row's steps ascending.
	f.lStart = ir.take(n + 1)
	for _, i := range lRow {
		f.lStart[rowStep[i]+1]++
	}
	for k := 0; k < n; k++ {
		f.lStart[k+1] += f.lStart[k]
	}
	f.lCol = ir.take(nl)
	f.lVal = fv.take(nl)
	next := ar.take(n)
	copy(next, f.lStart[:n])
	for e, i := range lRow {
		k := rowStep[i]
		f.lCol[next[k]] = lStep[e]
		f.lVal[next[k]] = lVal[e]
		next[k]++
	}
	f.uStart = ir.take(n + 1)
	copy(f.uStart, us)
	f.uCol = ir.take(nu)
	for t, j := range uc {
		f.uCol[t] = f.colStep[j]
	}
	f.uVal = fv.take(nu)
	copy(f.uVal, uv)
	f.uDiag = fv.take(n)
	copy(f.uDiag, uDiag)
	f.w = fv.take(n)
	f.aPrev = fv.take(nnz)
	f.rowChanged = ir.take(n)
	f.aValid = false
	// The fill of each row: its L, U and diagonal steps not in A's row.
	mark := next // reused: step → 1 + the last row with an A entry there
	clear(mark)
	f.zStart = ir.take(n + 1)
	f.zCol = ir.take(max(nz, 0))[:0]
	for k := int32(0); int(k) < n; k++ {
		for _, j := range f.aCol[f.aStart[k]:f.aStart[k+1]] {
			mark[j] = k + 1
		}
		if mark[k] != k+1 {
			f.zCol = append(f.zCol, k)
		}
		for _, j := range f.lCol[f.lStart[k]:f.lStart[k+1]] {
			if mark[j] != k+1 {
				f.zCol = append(f.zCol, j)
			}
		}
		for _, j := range f.uCol[f.uStart[k]:f.uStart[k+1]] {
			if mark[j] != k+1 {
				f.zCol = append(f.zCol, j)
			}
		}
		f.zStart[k+1] = int32(len(f.zCol))
	}
	f.done = true
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
func (a *analysis) search() (p, q int32, ok bool) {
	best := math.MaxInt
	bestRatio := 0.0
	visited := 0
	for c := 1; c <= a.n; c++ {
		// Columns with c active entries.
		for j := a.cl.head[c]; j >= 0; j = a.cl.next[j] {
			all := a.cols.list(j)
			live := all[:0]
			for _, i := range all {
				if a.rowActive[i] != 0 {
					live = append(live, i)
				}
			}
			a.cols.size[j] = int32(len(live))
			cc := c - 1
			for _, i := range live {
				v := math.Abs(a.valueAt(i, j))
				if v == 0 || !(v >= AnalysisThreshold*a.rowMax[i]) {
					continue
				}
				cost := (int(a.rl.count[i]) - 1) * cc
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
			rv := a.rows.values(i)
			for t, j := range a.rows.list(i) {
				v := math.Abs(rv[t])
				if v == 0 || !(v >= AnalysisThreshold*rmax) {
					continue
				}
				cost := cr * (int(a.cl.count[j]) - 1)
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
		if act != 0 {
			e.Rows = append(e.Rows, i)
			if a.rows.size[i] == 0 {
				e.Structural = true
			}
		}
	}
	for j, act := range a.colActive {
		if act == 0 {
			continue
		}
		e.Cols = append(e.Cols, j)
		live := false
		for _, i := range a.cols.list(int32(j)) {
			live = live || a.rowActive[i] != 0
		}
		if !live {
			e.Structural = true
		}
	}
	return e
}
