package sparse

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// Slot gives each position one slot however often it is asked, and
// RowSlots lists a row's slots by ascending column. The reference is a Go
// map from position to slot and a sort of each row's columns (standard
// library).
func TestPatternSlots(t *testing.T) {
	tests := []struct {
		name       string
		n, size    int
		positions  int
		longRowOf3 bool // one row holding most positions, as a supply node does
	}{
		{"empty", 3, 0, 0, false},
		{"within the size hint", 20, 200, 100, false},
		{"growing past the hint", 50, 4, 600, false},
		{"one long row", 300, 16, 900, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(5, uint64(tt.n)))
			p := NewPatternSize(tt.n, tt.size)
			want := map[[2]int]int{}
			for k := 0; k < tt.positions; k++ {
				i, j := rng.IntN(tt.n), rng.IntN(tt.n)
				if tt.longRowOf3 && k%4 != 0 {
					i = 3
				}
				s := p.Slot(i, j)
				if w, ok := want[[2]int{i, j}]; ok && s != w {
					t.Fatalf("(%d, %d): slot %d, earlier %d", i, j, s, w)
				} else if !ok {
					if s != len(want) {
						t.Fatalf("(%d, %d): new slot %d, want %d", i, j, s, len(want))
					}
					want[[2]int{i, j}] = s
				}
			}
			m := p.Matrix()
			if m.Len() != len(want) {
				t.Fatalf("%d slots, want %d", m.Len(), len(want))
			}
			for pos, s := range want {
				if i, j := m.Position(s); i != pos[0] || j != pos[1] {
					t.Errorf("slot %d at (%d, %d), want %v", s, i, j, pos)
				}
			}
			seen := 0
			for i := 0; i < tt.n; i++ {
				var cols []int
				for _, s := range m.RowSlots(i) {
					r, c := m.Position(int(s))
					if r != i {
						t.Fatalf("row %d lists slot %d of row %d", i, s, r)
					}
					cols = append(cols, c)
				}
				if !slices.IsSorted(cols) {
					t.Errorf("row %d columns %v not ascending", i, cols)
				}
				seen += len(cols)
			}
			if seen != len(want) {
				t.Errorf("rows list %d slots, want %d", seen, len(want))
			}
		})
	}
}
