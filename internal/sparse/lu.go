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

	// The two slabs the arrays above are carved from, kept for the next
	// analysis: a re-analysis whose factors fit in them (the same
	// pattern, fill no larger) allocates nothing below about 150
	// unknowns (its temporaries are on the stack).
	ints   []int32
	floats []float64

	// Analyses counts the pivot-order analyses done (the first one and
	// every re-analysis forced by a tiny pivot).
	Analyses int
}

// Restart makes f start again from the pivot order of from, an LU that
// has factored a matrix: f's next Factor of a matrix with from's pattern
// refactors in from's order, recomputing every row, whatever f held
// before. f shares from's index structure, which is never modified once
// laid out (an analysis of f makes its own), and keeps value buffers of
// its own (reused from f's last restart when they fit), so from's
// factors are untouched by f and restarting allocates nothing after the
// first time. A caller that solves the same system again and again keeps
// one analysed LU and restarts a working one from it: each run then
// starts from the same state, and its numbers do not depend on earlier
// runs. from must not be factored again while f shares its structure.
func (f *LU) Restart(from *LU) {
	floats, changed := f.floats, f.rowChanged
	if sameStart(floats, from.floats) {
		floats = nil
	}
	if sameStart(changed, from.rowChanged) {
		changed = nil
	}
	*f = *from
	f.ints = nil // from's: an analysis of f must lay out its own
	f.aValid = false
	if !f.done {
		f.floats, f.rowChanged = nil, nil
		return
	}
	nf := len(f.lVal) + len(f.uVal) + 2*f.n + len(f.aPrev)
	if cap(floats) < nf {
		floats = make([]float64, nf)
	}
	if cap(changed) < f.n {
		changed = make([]int32, f.n)
	}
	// The value arrays in layout's order; their contents need no copy,
	// since the next refactor recomputes every row.
	fv := arena[float64](floats[:nf])
	f.floats = floats
	f.lVal, f.uVal, f.uDiag = fv.take(len(f.lVal)), fv.take(len(f.uVal)), fv.take(f.n)
	f.w, f.aPrev = fv.take(f.n), fv.take(len(f.aPrev))
	f.rowChanged = changed[:f.n]
}

// sameStart reports whether a and b start at the same element.
func sameStart[T any](a, b []T) bool {
	return cap(a) > 0 && cap(b) > 0 && &a[:1][0] == &b[:1][0]
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

// span returns the bounds [start[k], start[k+1]) of list k of a
// compressed structure whose items have length n. The check against n
// lets the compiler drop the bounds checks of the loops over the list;
// it never fails for the structures built here.
func span(start []int32, k, n int) (int, int) {
	p0, p1 := int(uint32(start[k])), int(uint32(start[k+1]))
	if p1 > n {
		panic("sparse: corrupt structure")
	}
	return p0, p1
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
	n := f.n
	// Local slices of checked lengths let the compiler keep them in
	// registers and drop most bounds checks.
	w := f.w[:n]
	vals := m.Values
	aStart, zStart := f.aStart[:n+1], f.zStart[:n+1]
	lStart, uStart := f.lStart[:n+1], f.uStart[:n+1]
	aSlot, zCol := f.aSlot, f.zCol
	aCol, aPrev := f.aCol[:len(aSlot)], f.aPrev[:len(aSlot)]
	lCol, uCol := f.lCol, f.uCol
	lVal, uVal := f.lVal[:len(lCol)], f.uVal[:len(uCol)]
	uDiag := f.uDiag[:n]
	changed := f.rowChanged[:n]
	valid := f.aValid
	f.aValid = false // until this refactor completes
	for k := 0; k < n; k++ {
		a0, a1 := span(aStart, k, len(aSlot))
		l0, l1 := span(lStart, k, len(lCol))
		if valid {
			same := true
			for p := a0; p < a1; p++ {
				if math.Float64bits(vals[aSlot[p]]) != math.Float64bits(aPrev[p]) {
					same = false
					break
				}
			}
			if same {
				for p := l0; p < l1; p++ {
					if changed[lCol[p]] != 0 {
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
		z0, z1 := span(zStart, k, len(zCol))
		for p := z0; p < z1; p++ {
			w[zCol[p]] = 0
		}
		for p := a0; p < a1; p++ {
			v := vals[aSlot[p]]
			aPrev[p] = v
			w[aCol[p]] = 0 + v
		}
		for p := l0; p < l1; p++ {
			c := int(lCol[p])
			l := w[c] / uDiag[c]
			lVal[p] = l
			if l == 0 {
				continue
			}
			q0, q1 := span(uStart, c, len(uCol))
			for q := q0; q < q1; q++ {
				w[uCol[q]] -= l * uVal[q]
			}
		}
		piv := w[k]
		big := math.Abs(piv)
		u0, u1 := span(uStart, k, len(uCol))
		for p := u0; p < u1; p++ {
			v := w[uCol[p]]
			uVal[p] = v
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
	n := f.n
	if n == 0 {
		return
	}
	y := f.w[:n]
	rowPerm, colPerm := f.rowPerm[:n], f.colPerm[:n]
	lStart, uStart := f.lStart[:n+1], f.uStart[:n+1]
	lCol, uCol := f.lCol, f.uCol
	lVal, uVal := f.lVal[:len(lCol)], f.uVal[:len(uCol)]
	uDiag := f.uDiag[:n]
	for k := 0; k < n; k++ {
		s := b[rowPerm[k]]
		p0, p1 := span(lStart, k, len(lCol))
		for p := p0; p < p1; p++ {
			s -= lVal[p] * y[lCol[p]]
		}
		y[k] = s
	}
	for k := n - 1; k >= 0; k-- {
		s := y[k]
		p0, p1 := span(uStart, k, len(uCol))
		for p := p0; p < p1; p++ {
			s -= uVal[p] * y[uCol[p]]
		}
		y[k] = s / uDiag[k]
	}
	for k, c := range colPerm {
		x[c] = y[k]
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

// line is a row or a column of the active submatrix during an analysis.
// Its items (a row's columns and values, a column's rows) are at
// [at, at+size) of its slab, with room for room items there; next and
// prev link it into the count list of bucket count (the lists let the
// Markowitz search visit the sparsest lines first), and count is −1 once
// the line has left the active submatrix. For a row, max is max_k |a_ik|
// over its active entries. One struct per line keeps what a step touches
// of a line together.
type line struct {
	at, size, room    int32
	next, prev, count int32
	max               float64
}

// span returns the bounds of the line's items in a slab of length n
// (checked, as the function span).
func (l *line) span(n int) (int, int) {
	p0 := int(uint32(l.at))
	p1 := p0 + int(uint32(l.size))
	if p1 > n {
		panic("sparse: corrupt structure")
	}
	return p0, p1
}

// countList is the set of count lists of rows or of columns: head[c] is
// the first line with count c, −1 none. A line is inserted at the head of
// its list, so each list is in the reverse order of its insertions.
type countList struct {
	lines []line
	head  []int32
}

func (c *countList) insert(i, cnt int32) {
	if int(cnt) >= len(c.head) {
		cnt = int32(len(c.head) - 1)
	}
	l := &c.lines[i]
	h := c.head[cnt]
	l.count, l.prev, l.next = cnt, -1, h
	if h >= 0 {
		c.lines[h].prev = i
	}
	c.head[cnt] = i
}

func (c *countList) remove(i int32) {
	l := &c.lines[i]
	if l.prev >= 0 {
		c.lines[l.prev].next = l.next
	} else {
		c.head[l.count] = l.next
	}
	if l.next >= 0 {
		c.lines[l.next].prev = l.prev
	}
}

// set moves line i to the head of the list of count cnt (even when cnt
// is its count already): remove and insert, written out so that the
// slices are loaded once.
func (c *countList) set(i, cnt int32) {
	lines, head := c.lines, c.head
	l := &lines[i]
	if l.prev < 0 && l.count == cnt {
		return // at the head of that list already
	}
	if l.prev >= 0 {
		lines[l.prev].next = l.next
	} else {
		head[l.count] = l.next
	}
	if l.next >= 0 {
		lines[l.next].prev = l.prev
	}
	if int(cnt) >= len(head) {
		cnt = int32(len(head) - 1)
	}
	h := head[cnt]
	l.count, l.prev, l.next = cnt, -1, h
	if h >= 0 {
		lines[h].prev = i
	}
	head[cnt] = i
}

// rowSlack is the spare room given to each row and column for fill-in
// before it must move; circuit rows rarely gain more.
const rowSlack = 4

// analysis is the state of one pivot-order analysis: the active
// submatrix by rows (columns and values) and, for the search, the rows of
// each column (lazily pruned of rows that left the active submatrix),
// and the factors as they are found. Indices are int32 to halve the
// memory the analysis touches.
type analysis struct {
	n          int
	row, col   []line
	rl, cl     countList // count lists over row and col
	rc         []int32   // the rows' items: columns …
	rv         []float64 // … and values (same length)
	cr         []int32   // the columns' items: rows
	rEnd, cEnd int32     // used length of rc (and rv) and of cr
	pos        []int32   // scatter: column → position in the row being updated, −1 none

	rowPerm, colPerm []int32 // step → original row, column
	// L's entries by step (column): lRow[lAt[k]:lAt[k+1]] are the
	// original rows of step k's entries, lVal their values; nl entries
	// are in use.
	lRow, lAt []int32
	lVal      []float64
	nl        int
	// U's rows by step: original columns uc[uAt[k]:uAt[k+1]], values
	// uv, diagonal uDiag[k]; nu entries are in use.
	uc, uAt   []int32
	uv, uDiag []float64
	nu        int
}

// workSize is what an analysis of an n×n matrix with nnz slots needs
// from its buffers: ints int32s, floats float64s and lines lines. The
// rows and the columns get rowSlack spare places each for fill and
// another spare for lines that outgrow theirs; L and U share nnz − n +
// fill entries and each gets room for about half of them and the fill of
// a few per row. Lists that outgrow these move to the heap.
type workSize struct{ n, nnz, items, half, ints, floats, lines int }

func newWorkSize(n, nnz int) workSize {
	s := workSize{n: n, nnz: nnz, lines: 2 * n}
	s.items = nnz + rowSlack*n + nnz/8 + n
	s.half = max(nnz-n, 0)/2 + n + n/4
	// Count-list heads, row and column items, pos, the pivot order,
	// L's rows and step starts, U's columns and row starts, layout's
	// scratch.
	s.ints = 2*(n+2) + 2*s.items + n + 2*n + s.half + n + 1 + s.half + n + 1 + 3*n
	// Row values, L's and U's values, U's diagonal.
	s.floats = s.items + 2*s.half + n
	return s
}

func (s workSize) fits(ints, floats, lines int) bool {
	return s.ints <= ints && s.floats <= floats && s.lines <= lines
}

// Buffers on the stack for an analysis's temporaries: the small ones
// hold circuits of about 60 unknowns, the medium ones about 150 (a few
// and a few tens of kilobytes of stack, zeroed at each call). Larger
// matrices take them from the heap.
const (
	smallInts, smallFloats, smallLines    = 2048, 1024, 128
	mediumInts, mediumFloats, mediumLines = 6144, 3072, 320
)

// analyse chooses a pivot order from m's values (restricted Markowitz with
// the threshold test), factors m on the way, and lays out the static
// structures that refactor reuses.
func (f *LU) analyse(m *Matrix) error {
	f.Analyses++
	f.done = false
	s := newWorkSize(m.n, len(m.rows))
	switch {
	case s.fits(smallInts, smallFloats, smallLines):
		return f.analyseSmall(m, s)
	case s.fits(mediumInts, mediumFloats, mediumLines):
		return f.analyseMedium(m, s)
	}
	return f.analyseIn(m, s, make([]int32, s.ints), make([]float64, s.floats), make([]line, s.lines))
}

// analyseSmall and analyseMedium run analyseIn on stack buffers; they are
// not inlined so that only the call that uses a buffer zeroes it and has
// it in its frame.
//
//go:noinline
func (f *LU) analyseSmall(m *Matrix, s workSize) error {
	var ib [smallInts]int32
	var fb [smallFloats]float64
	var lb [smallLines]line
	return f.analyseIn(m, s, ib[:], fb[:], lb[:])
}

//go:noinline
func (f *LU) analyseMedium(m *Matrix, s workSize) error {
	var ib [mediumInts]int32
	var fb [mediumFloats]float64
	var lb [mediumLines]line
	return f.analyseIn(m, s, ib[:], fb[:], lb[:])
}

// analyseIn is analyse with its temporaries carved from ints, floats and
// lines (sized by s).
func (f *LU) analyseIn(m *Matrix, s workSize, ints []int32, floats []float64, lines []line) error {
	n := m.n
	ar, fr := arena[int32](ints), arena[float64](floats)
	a := analysis{n: n, row: lines[:n:n], col: lines[n : 2*n : 2*n]}
	a.rl = countList{a.row, ar.take(n + 2)}
	a.cl = countList{a.col, ar.take(n + 2)}
	a.rc, a.rv, a.cr = ar.take(s.items), fr.take(s.items), ar.take(s.items)
	a.pos = ar.take(n)
	a.rowPerm, a.colPerm = ar.take(n), ar.take(n)
	a.lRow, a.lAt, a.lVal = ar.take(s.half), ar.take(n+1), fr.take(s.half)
	a.uc, a.uAt, a.uv = ar.take(s.half), ar.take(n+1), fr.take(s.half)
	a.uDiag = fr.take(n)
	a.load(m)
	for k := 0; k < n; k++ {
		if !a.step(k) {
			return a.singular()
		}
	}
	f.layout(m, &a, ar.take(3*n))
	return nil
}

// load sets up the active submatrix as m: every row and column active,
// with its entries in ascending order (of column, of row).
func (a *analysis) load(m *Matrix) {
	n := a.n
	rows, cols := a.row, a.col
	mcols, vals, slots := m.cols, m.Values, m.rowSlots
	rc, rv := a.rc, a.rv[:len(a.rc)]
	off := 0
	for i := range rows {
		s0, s1 := span(m.rowStart, i, len(slots))
		size := s1 - s0
		if off+size > len(rc) {
			panic("sparse: corrupt structure")
		}
		var big float64
		for p := s0; p < s1; p++ {
			s := slots[p]
			v := vals[s]
			rc[off], rv[off] = mcols[s], v
			off++
			if x := math.Abs(v); x > big {
				big = x
			}
		}
		rows[i] = line{at: int32(off - size), size: int32(size), room: int32(size + rowSlack), max: big}
		off += rowSlack
	}
	a.rEnd = int32(off)
	for j := range cols {
		cols[j] = line{room: rowSlack}
	}
	for _, j := range mcols {
		cols[j].room++
	}
	off = 0
	for j := range cols {
		c := &cols[j]
		c.at = int32(off)
		off += int(c.room)
	}
	a.cEnd = int32(off)
	cr := a.cr
	for i := range rows {
		p0, p1 := rows[i].span(len(rc))
		for p := p0; p < p1; p++ {
			c := &cols[rc[p]]
			cr[c.at+c.size] = int32(i)
			c.size++
		}
	}
	rh, ch := a.rl.head, a.cl.head
	ch = ch[:len(rh)]
	for c := range rh {
		rh[c], ch[c] = -1, -1
	}
	for i := n - 1; i >= 0; i-- { // reverse, so that each list starts with its lowest index
		a.rl.insert(int32(i), rows[i].size)
		a.cl.insert(int32(i), cols[i].size)
	}
	pos := a.pos
	for j := range pos {
		pos[j] = -1
	}
}

// step does step k of the elimination: it chooses the pivot, moves its
// row to U and eliminates its column from the other active rows. It
// reports false when no pivot is left.
func (a *analysis) step(k int) bool {
	p, q, ok := a.search()
	if !ok {
		return false
	}
	rows, cols := a.row, a.col
	a.rowPerm[k], a.colPerm[k] = p, q
	a.rl.remove(p)
	a.cl.remove(q)
	rows[p].count, cols[q].count = -1, -1 // inactive
	// The pivot row leaves the active submatrix: it becomes U's row k.
	u0 := a.nu
	var piv float64
	rc, rv := a.rc, a.rv[:len(a.rc)]
	p0, p1 := rows[p].span(len(rc))
	if u0+p1-p0 > len(a.uc) {
		a.uc, a.uv = grow(a.uc, u0+p1-p0), grow(a.uv, u0+p1-p0)
	}
	uc, uv := a.uc, a.uv[:len(a.uc)]
	u1 := u0
	for t := p0; t < p1; t++ {
		j := rc[t]
		if j == q {
			piv = rv[t]
			continue
		}
		uc[u1], uv[u1] = j, rv[t]
		u1++
		a.cl.set(j, cols[j].count-1)
	}
	a.nu = u1
	a.uAt[k], a.uAt[k+1] = int32(u0), int32(u1)
	a.uDiag[k] = piv
	// Eliminate column q from the other active rows.
	nl := a.nl
	a.lAt[k] = int32(nl)
	cr := a.cr
	c0, c1 := cols[q].span(len(cr))
	for t := c0; t < c1; t++ {
		i := cr[t]
		if rows[i].count < 0 {
			continue
		}
		l := a.eliminate(i, q, piv, u0, u1)
		if nl == len(a.lRow) {
			a.lRow, a.lVal = grow(a.lRow, nl+1), grow(a.lVal, nl+1)
		}
		a.lRow[nl], a.lVal[nl] = i, l
		nl++
	}
	a.nl = nl
	a.lAt[k+1] = int32(nl)
	cols[q].size = 0
	return true
}

// directLimit bounds the product of a row's length and the pivot row's
// for which eliminate finds their common columns by scanning the row
// rather than by scattering it into pos.
const directLimit = 64

// eliminate removes column q from active row i and subtracts l times the
// pivot row (U's entries u0 to u1, without q) from it, where
// l = a_iq / piv, which it returns. Columns of the pivot row that row i
// lacks are appended to it (fill).
func (a *analysis) eliminate(i, q int32, piv float64, u0, u1 int) float64 {
	r := &a.row[i]
	rc, rv := a.rc, a.rv[:len(a.rc)]
	r0, r1 := r.span(len(rc))
	var aiq float64
	for t := r0; t < r1; t++ {
		if rc[t] == q {
			aiq = rv[t]
			r1--
			rc[t], rv[t] = rc[r1], rv[r1]
			break
		}
	}
	r.size = int32(r1 - r0)
	l := aiq / piv
	uc, uv := a.uc[:u1], a.uv[:u1]
	if (r1-r0)*(u1-u0) <= directLimit {
		for t := u0; t < u1; t++ {
			j := uc[t]
			p := r0
			for p < r1 && rc[p] != j {
				p++
			}
			if p < r1 {
				rv[p] -= l * uv[t]
				continue
			}
			if a.fill(r, i, j, -l*uv[t]) { // the row moved
				rc, rv = a.rc, a.rv[:len(a.rc)]
				r0, r1 = int(r.at), int(r.at)+(r1-r0)
			}
		}
	} else {
		pos := a.pos
		for t := r0; t < r1; t++ {
			pos[rc[t]] = int32(t - r0)
		}
		for t := u0; t < u1; t++ {
			j := uc[t]
			if p := pos[j]; p >= 0 {
				a.rv[r.at+p] -= l * uv[t]
				continue
			}
			a.fill(r, i, j, -l*uv[t])
		}
		rc = a.rc
		for t := int(r.at); t < int(r.at)+(r1-r0); t++ {
			pos[rc[t]] = -1
		}
		rv = a.rv[:len(a.rc)]
	}
	var big float64
	r0, r1 = r.span(len(rv))
	for t := r0; t < r1; t++ {
		if x := math.Abs(rv[t]); x > big {
			big = x
		}
	}
	r.max = big
	a.rl.set(i, r.size)
	return l
}

// fill appends column j with value v to row r (index i), and i to column
// j. It reports whether the row moved.
func (a *analysis) fill(r *line, i, j int32, v float64) bool {
	moved := r.size == r.room
	if moved {
		a.growRow(r)
	}
	a.rc[r.at+r.size] = j
	a.rv[r.at+r.size] = v
	r.size++
	c := &a.col[j]
	if c.size == c.room {
		a.pruneCol(c)
		if c.size == c.room {
			a.growCol(c)
		}
	}
	a.cr[c.at+c.size] = i
	c.size++
	a.cl.set(j, c.count+1)
	return moved
}

// grow returns a copy of s on the heap with twice its length, or n if
// that is more.
func grow[T int32 | float64](s []T, n int) []T {
	g := make([]T, max(2*len(s), n))
	copy(g, s)
	return g
}

// growRow moves row r to the end of the row slab, with room for twice
// its items and rowSlack more. When the slab is full, it moves to a
// larger one on the heap.
func (a *analysis) growRow(r *line) {
	room := 2*r.size + rowSlack
	if end := int(a.rEnd + room); end > len(a.rc) {
		size := max(2*len(a.rc), end)
		rc, rv := make([]int32, size), make([]float64, size)
		copy(rc, a.rc[:a.rEnd])
		copy(rv, a.rv[:a.rEnd])
		a.rc, a.rv = rc, rv
	}
	copy(a.rc[a.rEnd:], a.rc[r.at:r.at+r.size])
	copy(a.rv[a.rEnd:], a.rv[r.at:r.at+r.size])
	r.at, r.room = a.rEnd, room
	a.rEnd += room
}

// pruneCol drops the rows that left the active submatrix from column c
// (as search does; the order of the others is kept).
func (a *analysis) pruneCol(c *line) {
	cr, rows := a.cr, a.row
	c0, c1 := c.span(len(cr))
	live := c0
	for t := c0; t < c1; t++ {
		if i := cr[t]; rows[i].count >= 0 {
			cr[live] = i
			live++
		}
	}
	c.size = int32(live - c0)
}

// growCol is growRow for column c.
func (a *analysis) growCol(c *line) {
	room := 2*c.size + rowSlack
	if end := int(a.cEnd + room); end > len(a.cr) {
		cr := make([]int32, max(2*len(a.cr), end))
		copy(cr, a.cr[:a.cEnd])
		a.cr = cr
	}
	copy(a.cr[a.cEnd:], a.cr[c.at:c.at+c.size])
	c.at, c.room = a.cEnd, room
	a.cEnd += room
}

// layout lays out the static structures of the factorization in step
// numbering from the analysis's results (pivot order, L by steps, U by
// rows, all in original numbering). scratch holds 3n int32s. The
// structures that persist take one int32 and one float64 slab, those of
// the last analysis when they are large enough.
func (f *LU) layout(m *Matrix, a *analysis, scratch []int32) {
	n, nnz, nl, nu := m.n, len(m.rows), a.nl, a.nu
	nz := n + nl + nu - nnz // fill, exact: A's entries are a subset of L, U and the diagonal
	ni, nf := 7*n+4+2*nnz+nl+nu+max(nz, 0), nl+nu+2*n+nnz
	if cap(f.ints) < ni {
		f.ints = make([]int32, ni)
	}
	if cap(f.floats) < nf {
		f.floats = make([]float64, nf)
	}
	ir, fv := arena[int32](f.ints[:ni]), arena[float64](f.floats[:nf])
	f.n, f.m = n, m
	rowPerm, colPerm := ir.take(n), ir.take(n)
	copy(rowPerm, a.rowPerm)
	copy(colPerm, a.colPerm)
	colStep, rowStep, next := scratch[:n], scratch[n:2*n], scratch[2*n:3*n]
	for k, j := range colPerm {
		colStep[j] = int32(k)
	}
	for k, i := range rowPerm {
		rowStep[i] = int32(k)
	}
	// L by rows in step numbering: a counting sort of the entries by
	// row, which keeps each row's steps ascending.
	lStart := ir.take(n + 1)
	clear(lStart)
	lRow := a.lRow[:nl]
	for _, i := range lRow {
		lStart[rowStep[i]+1]++
	}
	for k := 0; k < n; k++ {
		lStart[k+1] += lStart[k]
	}
	lCol, lVal := ir.take(nl), fv.take(nl)
	copy(next, lStart[:n])
	aVal := a.lVal[:len(lRow)]
	for k := 0; k < n; k++ {
		e0, e1 := span(a.lAt, k, len(lRow))
		for e := e0; e < e1; e++ {
			s := rowStep[lRow[e]]
			lCol[next[s]] = int32(k)
			lVal[next[s]] = aVal[e]
			next[s]++
		}
	}
	uStart := ir.take(n + 1)
	copy(uStart, a.uAt)
	uCol := ir.take(nu)
	for t, j := range a.uc[:nu] {
		uCol[t] = colStep[j]
	}
	uVal, uDiag := fv.take(nu), fv.take(n)
	copy(uVal, a.uv[:nu])
	copy(uDiag, a.uDiag)
	// A's rows in step numbering, and the fill of each row: its L, U and
	// diagonal steps not in A's row.
	aStart, aSlot, aCol := ir.take(n+1), ir.take(nnz), ir.take(nnz)
	zStart, zCol := ir.take(n+1), ir.take(max(nz, 0))[:0]
	mark := next // reused: step → 1 + the last row with an A entry there
	clear(mark)
	aStart[0], zStart[0] = 0, 0
	slots, mcols := m.rowSlots, m.cols
	e := 0
	for k, i := range rowPerm {
		row := int32(k) + 1
		s0, s1 := span(m.rowStart, int(i), len(slots))
		for p := s0; p < s1; p++ {
			s := slots[p]
			j := colStep[mcols[s]]
			aSlot[e], aCol[e] = s, j
			mark[j] = row
			e++
		}
		aStart[k+1] = int32(e)
		if mark[k] != row {
			zCol = append(zCol, int32(k))
		}
		p0, p1 := span(lStart, k, len(lCol))
		for p := p0; p < p1; p++ {
			if j := lCol[p]; mark[j] != row {
				zCol = append(zCol, j)
			}
		}
		p0, p1 = span(uStart, k, len(uCol))
		for p := p0; p < p1; p++ {
			if j := uCol[p]; mark[j] != row {
				zCol = append(zCol, j)
			}
		}
		zStart[k+1] = int32(len(zCol))
	}
	f.rowPerm, f.colPerm = rowPerm, colPerm
	f.aStart, f.aSlot, f.aCol = aStart, aSlot, aCol
	f.zStart, f.zCol = zStart, zCol
	f.lStart, f.lCol, f.lVal = lStart, lCol, lVal
	f.uStart, f.uCol, f.uVal, f.uDiag = uStart, uCol, uVal, uDiag
	f.w = fv.take(n)
	f.aPrev = fv.take(nnz)
	f.rowChanged = ir.take(n)
	f.aValid = false
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
	rows, cols := a.row, a.col
	rl, cl := a.rl.head, a.cl.head
	rc, rv, cr := a.rc, a.rv[:len(a.rc)], a.cr
	for c, n := 1, a.n; c <= n; c++ {
		// Columns with c active entries.
		for j := cl[c]; j >= 0; j = cols[j].next {
			col := &cols[j]
			a.pruneCol(col) // only active rows are candidates
			c0, c1 := col.span(len(cr))
			cc := c - 1
			for t := c0; t < c1; t++ {
				i := cr[t]
				r := &rows[i]
				// The value at (i, j).
				var v float64
				r0, r1 := r.span(len(rc))
				for e := r0; e < r1; e++ {
					if rc[e] == j {
						v = rv[e]
						break
					}
				}
				v = math.Abs(v)
				if v == 0 || !(v >= AnalysisThreshold*r.max) {
					continue
				}
				cost := (int(r.count) - 1) * cc
				ratio := v / r.max
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
		for i := rl[c]; i >= 0; i = rows[i].next {
			r := &rows[i]
			rmax := r.max
			cr := c - 1
			r0, r1 := r.span(len(rc))
			for e := r0; e < r1; e++ {
				v := math.Abs(rv[e])
				if v == 0 || !(v >= AnalysisThreshold*rmax) {
					continue
				}
				j := rc[e]
				cost := cr * (int(cols[j].count) - 1)
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
	for i := range a.row {
		if r := &a.row[i]; r.count >= 0 {
			e.Rows = append(e.Rows, i)
			if r.size == 0 {
				e.Structural = true
			}
		}
	}
	for j := range a.col {
		c := &a.col[j]
		if c.count < 0 {
			continue
		}
		e.Cols = append(e.Cols, j)
		live := false
		for _, i := range a.cr[c.at : c.at+c.size] {
			live = live || a.row[i].count >= 0
		}
		if !live {
			e.Structural = true
		}
	}
	return e
}
