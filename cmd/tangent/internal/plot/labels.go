package plot

import (
	"math"

	"gonum.org/v1/plot/vg"
)

// placer puts annotation labels where they overlap nothing already on the
// page: curves, symbols and earlier labels. Candidates are tried in the
// caller's order of preference; deterministic, greedy.
type placer struct {
	area  vg.Rectangle // labels stay inside
	taken []vg.Rectangle
}

func overlaps(a, b vg.Rectangle) bool {
	return a.Min.X < b.Max.X && b.Min.X < a.Max.X && a.Min.Y < b.Max.Y && b.Min.Y < a.Max.Y
}

func inside(a, area vg.Rectangle) bool {
	return a.Min.X >= area.Min.X && a.Max.X <= area.Max.X && a.Min.Y >= area.Min.Y && a.Max.Y <= area.Max.Y
}

func (p *placer) block(r vg.Rectangle) { p.taken = append(p.taken, r) }

// blockPoint blocks a square of half-side h around pt.
func (p *placer) blockPoint(pt vg.Point, h vg.Length) {
	p.block(vg.Rectangle{Min: vg.Point{X: pt.X - h, Y: pt.Y - h}, Max: vg.Point{X: pt.X + h, Y: pt.Y + h}})
}

// blockPolyline blocks a band of half-width h along a polyline, as small
// squares at most 2h apart.
func (p *placer) blockPolyline(pts []vg.Point, h vg.Length) {
	for i, pt := range pts {
		if i == 0 {
			p.blockPoint(pt, h)
			continue
		}
		a := pts[i-1]
		d := math.Hypot(float64(pt.X-a.X), float64(pt.Y-a.Y))
		n := int(math.Ceil(d / float64(2*h)))
		if n > 1000 {
			n = 1000
		}
		for k := 1; k <= n; k++ {
			f := vg.Length(float64(k) / float64(n))
			p.blockPoint(vg.Point{X: a.X + (pt.X-a.X)*f, Y: a.Y + (pt.Y-a.Y)*f}, h)
		}
	}
}

func (p *placer) free(r vg.Rectangle) bool {
	if !inside(r, p.area) {
		return false
	}
	for _, t := range p.taken {
		if overlaps(r, t) {
			return false
		}
	}
	return true
}

// place returns the first free candidate and blocks it. If none is free it
// returns false and blocks nothing.
func (p *placer) place(cands []vg.Rectangle) (vg.Rectangle, bool) {
	for _, r := range cands {
		if p.free(r) {
			p.block(r)
			return r, true
		}
	}
	return vg.Rectangle{}, false
}
