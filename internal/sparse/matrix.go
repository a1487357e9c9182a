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
// nonzeros and gives each position a slot: an index into Matrix.Values.
// The slots of a row form a linked list through next, so that adding a
// position allocates nothing but amortized growth of three flat slices.
type Pattern struct {
	n    int
	head []int // first slot of each row, −1 none
	next []int // next slot of the same row, −1 none
	rows []int // row of each slot
	cols []int // column of each slot
}

// NewPattern returns an empty pattern for an n×n matrix.
func NewPattern(n int) *Pattern {
	p := &Pattern{n: n, head: make([]int, n)}
	for i := range p.head {
		p.head[i] = -1
	}
	return p
}

// Slot returns the slot of position (i, j), adding the position when it
// is new. It panics when i or j is outside [0, n). Rows of circuit
// matrices are short, so a row is searched linearly.
func (p *Pattern) Slot(i, j int) int {
	if i < 0 || j < 0 || i >= p.n || j >= p.n {
		panic(fmt.Sprintf("sparse: position (%d, %d) outside a %d×%d matrix", i, j, p.n, p.n))
	}
	for k := p.head[i]; k >= 0; k = p.next[k] {
		if p.cols[k] == j {
			return k
		}
	}
	s := len(p.rows)
	p.next = append(p.next, p.head[i])
	p.head[i] = s
	p.rows = append(p.rows, i)
	p.cols = append(p.cols, j)
	return s
}

// Matrix returns a matrix over the pattern with all values zero. Positions
// added to the pattern afterwards are not part of the matrix.
func (p *Pattern) Matrix() *Matrix {
	m := &Matrix{
		n:      p.n,
		rows:   append([]int(nil), p.rows...),
		cols:   append([]int(nil), p.cols...),
		Values: make([]float64, len(p.rows)),
	}
	// Compressed rows: slots of each row in ascending column order.
	m.rowStart = make([]int, p.n+1)
	for _, i := range m.rows {
		m.rowStart[i+1]++
	}
	for i := 0; i < p.n; i++ {
		m.rowStart[i+1] += m.rowStart[i]
	}
	m.rowSlots = make([]int, len(m.rows))
	next := append([]int(nil), m.rowStart[:p.n]...)
	for s, i := range m.rows {
		m.rowSlots[next[i]] = s
		next[i]++
	}
	for i := 0; i < p.n; i++ {
		// Insertion sort: rows are short, and it allocates nothing.
		r := m.rowSlots[m.rowStart[i]:m.rowStart[i+1]]
		for a := 1; a < len(r); a++ {
			for b := a; b > 0 && m.cols[r[b]] < m.cols[r[b-1]]; b-- {
				r[b], r[b-1] = r[b-1], r[b]
			}
		}
	}
	return m
}

// Matrix is an n×n sparse matrix: Values[s] is the entry at the position
// of slot s. Values may be changed freely; the pattern may not.
type Matrix struct {
	n          int
	rows, cols []int // position of each slot
	rowStart   []int // slots of row i: rowSlots[rowStart[i]:rowStart[i+1]]
	rowSlots   []int
	Values     []float64
}

// N returns the order of the matrix.
func (m *Matrix) N() int { return m.n }

// Len returns the number of slots.
func (m *Matrix) Len() int { return len(m.Values) }

// Position returns the row and column of slot s.
func (m *Matrix) Position(s int) (i, j int) { return m.rows[s], m.cols[s] }

// RowSlots returns the slots of row i in ascending column order. The
// slice belongs to the matrix and must not be modified.
func (m *Matrix) RowSlots(i int) []int { return m.rowSlots[m.rowStart[i]:m.rowStart[i+1]] }

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
	colMatch := make([]int, n) // row matched to each column, −1 none
	for j := range colMatch {
		colMatch[j] = -1
	}
	rowMatch := make([]int, n)
	visited := make([]int, n) // visit stamp per column
	for j := range visited {
		visited[j] = -1
	}
	// Iterative depth-first search for an augmenting path from row r.
	type frame struct{ row, next int } // next: the row's next slot to try
	stack := make([]frame, 0, 16)
	for r := 0; r < n; r++ {
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
		path := make([]int, 0, 8) // column chosen at each depth
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
