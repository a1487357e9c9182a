// Package sparse holds square sparse matrices whose pattern of structural
// nonzeros is fixed while their values change, and their LU factorization
//
//	P·A·Q = L·U
//
// where P and Q are permutations chosen once for sparsity (few fill-ins)
// and stability, L is unit lower triangular and U is upper triangular.
// This is the shape of a Newton iteration on a circuit: the same pattern is
// refactored with new values many times, so the pivot order is analysed
// once and each later factorization only redoes the arithmetic, in buffers
// allocated by the analysis.
//
// The pivot order is Markowitz's (choose the entry that minimises
// (r−1)·(c−1), r and c the counts of its row and column in the active
// submatrix) restricted to entries that pass a threshold test
// |a_ij| ≥ u·max_k |a_ik| against their row (H. M. Markowitz, Management
// Science 3(3), 1957; the threshold variant as in I. S. Duff, A. M.
// Erisman, J. K. Reid, "Direct Methods for Sparse Matrices", 1986, from
// memory). A dense factorization is the better choice below a few dozen
// unknowns or when the matrix is mostly full.
package sparse

import "fmt"

// Pattern collects the positions (row, column) of a matrix's structural
// nonzeros and gives each position a slot: an index into Matrix.Values,
// in the order the positions first appear. The slots of a row form a
// linked list through next. While rows are short (most circuit rows
// hold a handful of positions), Slot finds a position by walking its
// row's list; once the walks grow long on average, an open-addressing
// hash table from position to slot takes over and finds a position in
// constant time however long its row. Indices are int32: half the memory
// of int, and 2³¹ slots is far beyond any circuit.
type Pattern struct {
	n    int
	head []int32 // first slot of each row, −1 none
	next []int32 // next slot of the same row, −1 none
	size []int32 // number of slots of each row
	rows []int32 // row of each slot
	cols []int32 // column of each slot

	// table[h] is 1 + the slot hashed to entry h, 0 for an empty entry
	// (linear probing), nil while the walks are short. Its length is a
	// power of two, at least twice the number of slots.
	table []int32
	shift uint // 64 − log2(len(table))

	long int // list steps walked in walks longer than scanLimit
}

// A walk longer than scanLimit list steps costs more than a hash-table
// lookup. The table takes over once such walks add up to scanLimit steps
// per slot (plus scanSlack slots, so that a few early walks along one
// long row, such as a supply node's, do not decide alone).
const (
	scanLimit = 8
	scanSlack = 16
)

// NewPattern returns an empty pattern for an n×n matrix.
func NewPattern(n int) *Pattern { return NewPatternSize(n, 0) }

// NewPatternSize returns an empty pattern for an n×n matrix with room for
// about size positions before its buffers grow.
func NewPatternSize(n, size int) *Pattern {
	size = max(size, 8)
	p := &Pattern{n: n}
	ints := make([]int32, 2*n+3*size)
	p.head, p.size, ints = ints[:n:n], ints[n:2*n:2*n], ints[2*n:]
	p.next = ints[0:0:size]
	p.rows = ints[size : size : 2*size]
	p.cols = ints[2*size : 2*size : 3*size]
	for i := range p.head {
		p.head[i] = -1
	}
	return p
}

// rehash sizes the hash table for size slots and enters every slot.
func (p *Pattern) rehash(size int) {
	m, shift := 16, uint(60)
	for m < size {
		m, shift = 2*m, shift-1
	}
	p.table, p.shift = make([]int32, m), shift
	for s := range p.rows {
		p.table[p.find(int(p.rows[s]), int(p.cols[s]))] = int32(s + 1)
	}
}

// find returns the hash-table entry of position (i, j): the one holding
// its slot, or the empty one where it belongs.
func (p *Pattern) find(i, j int) int {
	mask := len(p.table) - 1
	// Fibonacci hashing: the top bits of the key times 2⁶⁴/φ spread
	// consecutive keys over the table (Knuth, TAOCP vol. 3, §6.4, from
	// memory).
	h := int(uint64(i*p.n+j) * 0x9E3779B97F4A7C15 >> p.shift)
	for {
		e := p.table[h]
		if e == 0 {
			return h
		}
		if s := e - 1; int(p.rows[s]) == i && int(p.cols[s]) == j {
			return h
		}
		h = (h + 1) & mask
	}
}

// Slot returns the slot of position (i, j), adding the position when it
// is new. It panics when i or j is outside [0, n).
func (p *Pattern) Slot(i, j int) int {
	if uint(i) >= uint(p.n) || uint(j) >= uint(p.n) {
		panic(fmt.Sprintf("sparse: position (%d, %d) outside a %d×%d matrix", i, j, p.n, p.n))
	}
	if p.table == nil {
		// Walk row i's list.
		next, cols, c := p.next, p.cols, int32(j)
		steps := 0
		s := p.head[i]
		for s >= 0 && cols[s] != c {
			s = next[s]
			steps++
		}
		if s < 0 {
			s = int32(p.add(i, j))
		}
		if steps > scanLimit {
			p.long += steps
			if p.long > scanLimit*(len(p.rows)+scanSlack) {
				// Hash from here on, with a table sized for the
				// slots the pattern was made room for.
				p.rehash(max(4*len(p.rows), cap(p.rows)))
			}
		}
		return int(s)
	}
	h := p.find(i, j)
	if e := p.table[h]; e != 0 {
		return int(e - 1)
	}
	s := p.add(i, j)
	if 2*len(p.rows) > len(p.table) {
		p.rehash(4 * len(p.rows))
	} else {
		p.table[h] = int32(s + 1)
	}
	return s
}

// sortLimit is the longest row Matrix sorts by insertion; past it, a
// counting sort of all the slots is cheaper.
const sortLimit = 32

// longest returns the number of slots of the longest row.
func (p *Pattern) longest() int {
	var l int32
	for _, s := range p.size {
		l = max(l, s)
	}
	return int(l)
}

// add gives position (i, j) the next slot and returns it.
func (p *Pattern) add(i, j int) int {
	s := len(p.rows)
	p.next = append(p.next, p.head[i])
	p.head[i] = int32(s)
	p.size[i]++
	p.rows = append(p.rows, int32(i))
	p.cols = append(p.cols, int32(j))
	return s
}

// Matrix returns a matrix over the pattern with all values zero. Positions
// added to the pattern afterwards are not part of the matrix.
func (p *Pattern) Matrix() *Matrix {
	n, nnz := p.n, len(p.rows)
	m := &Matrix{
		n: n,
		// Shared with the pattern: later positions are appended
		// beyond nnz and never change these.
		rows:   p.rows[:nnz:nnz],
		cols:   p.cols[:nnz:nnz],
		Values: make([]float64, nnz),
	}
	// Compressed rows: slots of each row in ascending column order.
	if p.longest() <= sortLimit {
		// Short rows: each row's list sorted by insertion, from its
		// end (the list runs from the latest slot, and rows are often
		// stamped in ascending column order).
		ints := make([]int32, nnz+n+1)
		m.rowSlots = ints[:nnz:nnz]
		m.rowStart = ints[nnz:]
		rowSlots, cols, next := m.rowSlots, m.cols, p.next
		end := 0
		for i := 0; i < n; i++ {
			end += int(p.size[i])
			m.rowStart[i+1] = int32(end)
			first := end // rowSlots[first:end] is sorted
			for s := p.head[i]; s >= 0; s = next[s] {
				c := cols[s]
				first--
				t := first
				for t+1 < end && cols[rowSlots[t+1]] < c {
					rowSlots[t] = rowSlots[t+1]
					t++
				}
				rowSlots[t] = s
			}
		}
		return m
	}
	// Long rows: a counting sort on the column and then a stable one on
	// the row.
	ints := make([]int32, 2*nnz+2*(n+1))
	m.rowSlots = ints[:nnz:nnz]
	m.rowStart = ints[nnz : nnz+n+1 : nnz+n+1]
	colStart := ints[nnz+n+1 : nnz+2*(n+1)]
	byCol := ints[nnz+2*(n+1):] // the slots in column order
	for s := 0; s < nnz; s++ {
		colStart[m.cols[s]+1]++
		m.rowStart[m.rows[s]+1]++
	}
	for i := 0; i < n; i++ {
		colStart[i+1] += colStart[i]
		m.rowStart[i+1] += m.rowStart[i]
	}
	for s := 0; s < nnz; s++ {
		j := m.cols[s]
		byCol[colStart[j]] = int32(s)
		colStart[j]++
	}
	next := colStart[:n] // reused: next free place of each row
	copy(next, m.rowStart[:n])
	for _, s := range byCol {
		i := m.rows[s]
		m.rowSlots[next[i]] = s
		next[i]++
	}
	return m
}

// Matrix is an n×n sparse matrix: Values[s] is the entry at the position
// of slot s. Values may be changed freely; the pattern may not.
type Matrix struct {
	n          int
	rows, cols []int32 // position of each slot
	rowStart   []int32 // slots of row i: rowSlots[rowStart[i]:rowStart[i+1]]
	rowSlots   []int32
	Values     []float64
}

// N returns the order of the matrix.
func (m *Matrix) N() int { return m.n }

// Len returns the number of slots.
func (m *Matrix) Len() int { return len(m.Values) }

// Position returns the row and column of slot s.
func (m *Matrix) Position(s int) (i, j int) { return int(m.rows[s]), int(m.cols[s]) }

// RowSlots returns the slots of row i in ascending column order. The
// slice belongs to the matrix and must not be modified.
func (m *Matrix) RowSlots(i int) []int32 { return m.rowSlots[m.rowStart[i]:m.rowStart[i+1]] }

// Zero sets every value to zero.
func (m *Matrix) Zero() { clear(m.Values) }

// Clone returns a matrix with the same pattern and a copy of the values.
// The pattern is shared (it is never modified).
func (m *Matrix) Clone() *Matrix {
	c := *m
	c.Values = append([]float64(nil), m.Values...)
	return &c
}

// MulVec sets y = A·x. x and y must have length n and must not overlap.
func (m *Matrix) MulVec(y, x []float64) {
	for i := 0; i < m.n; i++ {
		var s float64
		for _, k := range m.rowSlots[m.rowStart[i]:m.rowStart[i+1]] {
			s += m.Values[k] * x[m.cols[k]]
		}
		y[i] = s
	}
}

// StructuralDefect finds a maximum matching of rows to columns over the
// pattern (each row matched to a column where it has a slot) and returns
// the rows and the columns left unmatched, in ascending order. Both are
// empty exactly when the pattern admits a nonsingular matrix (structural
// full rank): no choice of values can make the matrix invertible
// otherwise. The matching is found by augmenting paths (Kuhn's method).
func (p *Pattern) StructuralDefect() (rows, cols []int) {
	n := p.n
	work := make([]int32, 3*n)
	colMatch := work[:n:n] // row matched to each column, −1 none
	for j := range colMatch {
		colMatch[j] = -1
	}
	rowMatch := work[n : 2*n : 2*n]
	visited := work[2*n:] // visit stamp per column
	for j := range visited {
		visited[j] = -1
	}
	// Iterative depth-first search for an augmenting path from row r.
	type frame struct{ row, next int32 } // next: the row's next slot to try
	var stack []frame
	var path []int32 // column chosen at each depth
	for r := int32(0); int(r) < n; r++ {
		rowMatch[r] = -1
		// Cheap pass: a free column in the row.
		for k := p.head[r]; k >= 0; k = p.next[k] {
			if j := p.cols[k]; colMatch[j] < 0 {
				colMatch[j], rowMatch[r] = r, j
				break
			}
		}
		if rowMatch[r] >= 0 {
			continue
		}
		stack = append(stack[:0], frame{r, p.head[r]})
		path = path[:0]
		found := false
		for len(stack) > 0 && !found {
			f := &stack[len(stack)-1]
			if f.next < 0 {
				stack = stack[:len(stack)-1]
				if len(path) > 0 {
					path = path[:len(path)-1]
				}
				continue
			}
			j := p.cols[f.next]
			f.next = p.next[f.next]
			if visited[j] == r {
				continue
			}
			visited[j] = r
			path = append(path, j)
			if colMatch[j] < 0 {
				found = true
				break
			}
			stack = append(stack, frame{colMatch[j], p.head[colMatch[j]]})
		}
		if !found {
			continue
		}
		// Flip the path: stack[d].row takes path[d].
		for d := range path {
			row := stack[d].row
			colMatch[path[d]] = row
			rowMatch[row] = path[d]
		}
	}
	for i := 0; i < n; i++ {
		if rowMatch[i] < 0 {
			rows = append(rows, i)
		}
		if colMatch[i] < 0 {
			cols = append(cols, i)
		}
	}
	return rows, cols
}
