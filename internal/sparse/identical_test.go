package sparse

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"flag"
	"fmt"
	"hash"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"strings"
	"testing"
)

var printDigests = flag.Bool("identical.print", false, "print the digests of TestBitIdentical")

// digest accumulates the observable results of a sequence of
// factorizations into a SHA-256 hash (standard library).
type digest struct{ h hash.Hash }

func newDigest() *digest { return &digest{sha256.New()} }

func (d *digest) int(v int) { d.h.Write(binary.LittleEndian.AppendUint64(nil, uint64(v))) }

func (d *digest) float(v float64) { d.int(int(math.Float64bits(v))) }

func (d *digest) str(s string) { d.int(len(s)); d.h.Write([]byte(s)) }

func (d *digest) sum() string { return hex.EncodeToString(d.h.Sum(nil)) }

// factorization adds the outcome of f.Factor(m): the error, or the pivot
// order, the fill, the factors (each row of L and of U sorted by column)
// and the solutions of a few right-hand sides (all unit vectors as well
// for small n).
func (d *digest) factorization(f *LU, m *Matrix, err error, rng *rand.Rand) {
	d.int(f.Analyses)
	if err != nil {
		var se *SingularError
		if !errors.As(err, &se) {
			d.str(err.Error())
			return
		}
		d.str("singular")
		d.int(len(se.Rows))
		for _, i := range se.Rows {
			d.int(i)
		}
		d.int(len(se.Cols))
		for _, j := range se.Cols {
			d.int(j)
		}
		if se.Structural {
			d.int(1)
		} else {
			d.int(0)
		}
		return
	}
	n := m.N()
	d.int(n)
	d.int(f.Fill())
	for k := 0; k < n; k++ {
		d.int(int(f.rowPerm[k]))
		d.int(int(f.colPerm[k]))
	}
	d.factors(f)
	b := make([]float64, n)
	x := make([]float64, n)
	for r := 0; r < 4; r++ {
		for i := range b {
			b[i] = rng.Float64()*2 - 1
		}
		if r == 3 {
			f.Solve(b, b) // in place
			copy(x, b)
		} else {
			f.Solve(x, b)
		}
		for _, v := range x {
			d.float(v)
		}
	}
	if n <= 42 {
		for e := 0; e < n; e++ {
			clear(b)
			b[e] = 1
			f.Solve(x, b)
			for _, v := range x {
				d.float(v)
			}
		}
	}
}

// entry is one stored factor entry in step numbering.
type entry struct {
	col int
	val float64
}

// factorRows returns the rows of L (without its unit diagonal) and of U
// (diagonal included) in step numbering, each sorted by column.
func factorRows(f *LU) (l, u [][]entry) {
	l, u = make([][]entry, f.n), make([][]entry, f.n)
	for k := 0; k < f.n; k++ {
		for p := f.lStart[k]; p < f.lStart[k+1]; p++ {
			l[k] = append(l[k], entry{int(f.lCol[p]), f.lVal[p]})
		}
		u[k] = append(u[k], entry{k, f.uDiag[k]})
		for p := f.uStart[k]; p < f.uStart[k+1]; p++ {
			u[k] = append(u[k], entry{int(f.uCol[p]), f.uVal[p]})
		}
		sortEntries := func(e []entry) {
			slices.SortFunc(e, func(a, b entry) int { return a.col - b.col })
		}
		sortEntries(l[k])
		sortEntries(u[k])
	}
	return l, u
}

func (d *digest) factors(f *LU) {
	l, u := factorRows(f)
	for _, rows := range [2][][]entry{l, u} {
		for _, row := range rows {
			d.int(len(row))
			for _, e := range row {
				d.int(e.col)
				d.float(e.val)
			}
		}
	}
}

// valueKind chooses how fillKind sets the values.
type valueKind int

const (
	randomValues valueKind = iota // fillValues: dominant diagonal
	tiedValues                    // few distinct values: many Markowitz ties
	zeroValues                    // some entries exactly ±0
	wideValues                    // magnitudes over 24 decades: the threshold test bites
	weakDiagonal                  // diagonal no larger than the rest
)

func fillKind(rng *rand.Rand, m *Matrix, kind valueKind) {
	fillValues(rng, m)
	for s := range m.Values {
		i, j := m.Position(s)
		switch kind {
		case tiedValues:
			if i == j {
				m.Values[s] = 4
			} else {
				m.Values[s] = float64(rng.IntN(3) - 1)
			}
		case zeroValues:
			switch rng.IntN(5) {
			case 0:
				m.Values[s] = 0
			case 1:
				m.Values[s] = math.Copysign(0, -1)
			}
		case wideValues:
			m.Values[s] *= math.Pow(10, float64(rng.IntN(25)-12))
		case weakDiagonal:
			m.Values[s] = rng.Float64()*2 - 1
		}
	}
}

// identicalCase runs a fixed sequence of factorizations: the first
// analysis, refactors with every value changed, with a few rows changed,
// with a pivot made tiny (a re-analysis), with a row zeroed (singular),
// with a clone, and after the singular matrix again.
func identicalCase(m *Matrix, kind valueKind, seed uint64) string {
	rng := rand.New(rand.NewPCG(seed, 99))
	d := newDigest()
	var f LU
	fillKind(rng, m, kind)
	err := f.Factor(m)
	d.factorization(&f, m, err, rng)
	for round := 0; round < 8; round++ {
		switch round {
		case 0, 4: // every value
			fillKind(rng, m, kind)
		case 1, 2, 5: // a few rows
			for s := range m.Values {
				if i, _ := m.Position(s); i%5 == round {
					m.Values[s] *= 1 + rng.Float64()
				}
			}
		case 3: // a tiny pivot forces a new order
			if err == nil && m.N() > 1 {
				k := m.N() / 2
				for s := range m.Values {
					if i, j := m.Position(s); i == int(f.rowPerm[k]) && j == int(f.colPerm[k]) {
						m.Values[s] *= 1e-9
					}
				}
			}
		case 6: // a zero row: singular
			r := m.N() / 3
			for _, s := range m.RowSlots(r) {
				m.Values[s] = 0
			}
		case 7: // clone with new values
			m = m.Clone()
			fillKind(rng, m, kind)
		}
		err = f.Factor(m)
		d.factorization(&f, m, err, rng)
	}
	return d.sum()
}

// identicalMatrices lists the test matrices by name.
func identicalMatrices() []struct {
	name string
	m    func() *Matrix
	kind valueKind
	seed uint64
} {
	type tc = struct {
		name string
		m    func() *Matrix
		kind valueKind
		seed uint64
	}
	var cs []tc
	kinds := []valueKind{randomValues, tiedValues, zeroValues, wideValues, weakDiagonal}
	for _, n := range []int{1, 2, 5, 12, 42, 100, 300} {
		for _, reach := range []int{1, 4, 6, n} {
			if reach == n && (n == 1 || n == 4 || n == 6) {
				continue // the same as a fixed reach
			}
			for seed := uint64(1); seed <= 3; seed++ {
				for _, kind := range kinds {
					if n == 300 && (seed > 1 || reach == n) {
						continue
					}
					branches := n / 8
					cs = append(cs, tc{
						fmt.Sprintf("n%d/reach%d/seed%d/kind%d", n, reach, seed, kind),
						func() *Matrix {
							m, _ := circuitLike(rand.New(rand.NewPCG(uint64(n), seed)), n, branches, reach)
							return m
						}, kind, seed})
				}
			}
		}
	}
	// Random order of Slot calls, dense patches, an empty row and column
	// (structurally singular), two rows sharing one column.
	for seed := uint64(1); seed <= 4; seed++ {
		for _, n := range []int{6, 30, 90} {
			for _, kind := range kinds {
				cs = append(cs, tc{fmt.Sprintf("random/n%d/seed%d/kind%d", n, seed, kind), func() *Matrix {
					rng := rand.New(rand.NewPCG(seed, uint64(n)))
					p := NewPattern(n)
					for k := 0; k < 4*n; k++ {
						p.Slot(rng.IntN(n), rng.IntN(n))
					}
					for i := 0; i < n; i++ {
						p.Slot(i, i)
					}
					return p.Matrix()
				}, kind, seed})
				cs = append(cs, tc{fmt.Sprintf("holes/n%d/seed%d/kind%d", n, seed, kind), func() *Matrix {
					rng := rand.New(rand.NewPCG(seed, uint64(n)+1))
					p := NewPattern(n)
					for k := 0; k < 3*n; k++ {
						i, j := rng.IntN(n), rng.IntN(n)
						if i == n/2 || j == n/3 {
							continue
						}
						p.Slot(i, j)
					}
					return p.Matrix()
				}, kind, seed})
				cs = append(cs, tc{fmt.Sprintf("dense/n%d/seed%d/kind%d", n, seed, kind), func() *Matrix {
					p := NewPattern(n)
					for i := 0; i < n; i++ {
						for j := 0; j < n; j++ {
							if (i+j)%int(seed+1) != 0 || i == j {
								p.Slot(j, i)
							}
						}
					}
					return p.Matrix()
				}, kind, seed})
			}
		}
	}
	return cs
}

// TestBitIdentical checks that the pivot order, the fill, the factors,
// the solutions and the singularity reports are bitwise those recorded
// (in identical_digests_test.go) from the code before its optimisation
// (commit 264f2cc), the reference: run with -args -identical.print to
// print the table.
func TestBitIdentical(t *testing.T) {
	if runtime.GOARCH != "amd64" {
		// Other targets may fuse a multiply and a subtraction into one
		// rounding (the Go spec allows it), which changes the bits.
		t.Skip("digests recorded on amd64")
	}
	// One digest per group of cases (the name up to "/seed"), over the
	// digests of its cases in order: a short table that still says
	// where a difference is.
	groups := map[string]hash.Hash{}
	var order []string
	for _, c := range identicalMatrices() {
		g := c.name[:strings.Index(c.name, "/seed")]
		h, ok := groups[g]
		if !ok {
			h = sha256.New()
			groups[g] = h
			order = append(order, g)
		}
		h.Write([]byte(c.name + " " + identicalCase(c.m(), c.kind, c.seed) + "\n"))
	}
	for _, g := range order {
		got := fmt.Sprintf("%x", groups[g].Sum(nil))[:32]
		if *printDigests {
			fmt.Printf("\t%q: %q,\n", g, got)
			continue
		}
		if want, ok := identicalDigests[g]; !ok {
			t.Errorf("%s: no recorded digest", g)
		} else if got != want {
			t.Errorf("%s: digest %s, recorded %s", g, got, want)
		}
	}
	if len(order) != len(identicalDigests) && !*printDigests {
		t.Errorf("%d groups, %d recorded digests", len(order), len(identicalDigests))
	}
}

// TestPatternIdentical checks slot numbering, row order and structural
// defect of patterns built by random Slot calls (walked and hashed)
// against digests of the code before its optimisation (commit 264f2cc).
func TestPatternIdentical(t *testing.T) {
	for _, tc := range []struct {
		n, size, calls int
		reach          int // > 0: every position within reach of the diagonal (short rows)
		row3           int // > 0: all calls but every row3-th in row 3; < 0: every −row3-th call
		want           string
	}{
		{1, 0, 3, 0, 0, "17b0761f87b081d5cf10757ccc89f12be355c70e2e29df288b65b30710dcbcd1"},
		{7, 0, 40, 0, 0, "e3c0058e638ac939ccbefbaa73dd4bfdf1ebead14b7da979a7e0731f76cbe611"},
		{42, 0, 380, 0, 0, "7189d8792f4040284ebbf31cb4de667dcfc446a57cc7126938f9c698fc0b9220"},
		{42, 400, 380, 0, 0, "7189d8792f4040284ebbf31cb4de667dcfc446a57cc7126938f9c698fc0b9220"},
		{100, 50, 2000, 0, 0, "6f35e78ee9eb743aeb17d3f66ca897bf5185316bf56f68a937482faf0a30aca9"},
		{300, 3000, 4000, 0, 0, "4c3fa5a5a8a55373895163e8b54fc7f6ad2ec4a232fb4e1d4027d80ed397e183"},
		{42, 380, 380, 2, 0, "8be5a6f650928d186680189adeec64826610ef3ec5793495784804c44ff3cc44"},
		{42, 0, 380, 3, 0, "6247f81c10007b5bbeb3ac00f89637cbe8414a5c68e84c55dfc1050615b2678d"},
		{200, 100, 1500, 4, 0, "a85e45d0a84a46cfb5585e4d3cd1fa124e2316719f3584dd7365cb199281d525"},
		{30, 10, 400, 15, 0, "e3645dc9da9b220e70e4024248ce713b040805a79993af3581287dee365c1234"},
		{40, 0, 1600, 0, 0, "760e17d84aa9c97bc61345b2a76e466d29e7524807848f70a77595547dc82600"},         // dense: hashed
		{300, 16, 900, 0, 4, "91b7e95abf15a7d8ed6795d339f30c051d70ffbbae1ef388b0e4ae2d1a2406c0"},        // one long row: hashed
		{2000, 6000, 6000, 1, -100, "0e7a2a6c858603368c993c578861454cc5c8df19ba9dca5753ad1be1bc0a286a"}, // one long row among short ones: walked
		{3, 0, 0, 0, 0, "57f5af9a85a0f82ba4361608a110ad3d62a9753e41d6577929d754e2631654f5"},
	} {
		rng := rand.New(rand.NewPCG(uint64(tc.n), uint64(tc.calls)))
		p := NewPatternSize(tc.n, tc.size)
		d := newDigest()
		for k := 0; k < tc.calls; k++ {
			i, j := rng.IntN(tc.n), rng.IntN(tc.n)
			switch {
			case tc.row3 > 0 && k%tc.row3 != 0, tc.row3 < 0 && k%-tc.row3 == 0:
				i = 3
			case tc.reach > 0:
				j = min(tc.n-1, max(0, i+rng.IntN(2*tc.reach+1)-tc.reach))
			case k%3 == 0: // short rows, as circuits have
				j = min(tc.n-1, max(0, i+rng.IntN(5)-2))
			}
			d.int(p.Slot(i, j))
		}
		m := p.Matrix()
		for i := 0; i < tc.n; i++ {
			for _, s := range m.RowSlots(i) {
				d.int(int(s))
			}
		}
		rows, cols := p.StructuralDefect()
		d.int(len(rows))
		d.int(len(cols))
		for _, i := range rows {
			d.int(i)
		}
		for _, j := range cols {
			d.int(j)
		}
		got := d.sum()
		if *printDigests {
			fmt.Printf("pattern n=%d size=%d calls=%d reach=%d row3=%d: %s\n", tc.n, tc.size, tc.calls, tc.reach, tc.row3, got)
			continue
		}
		if got != tc.want {
			t.Errorf("n=%d size=%d calls=%d reach=%d row3=%d: digest %s, recorded %s", tc.n, tc.size, tc.calls, tc.reach, tc.row3, got, tc.want)
		}
	}
}
