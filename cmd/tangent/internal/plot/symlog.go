package plot

import "math"

// symlog is the signed logarithmic scale of the pole-zero map,
//
//	u = sign(x)·log10(1 + |x|/x0),
//
// odd, continuous and strictly increasing: nearly linear (u ≈ x/(x0·ln 10))
// for |x| ≪ x0, logarithmic (one unit per decade) for |x| ≫ x0. It lets
// roots many decades apart, on both sides of the jω axis, share one map.
type symlog struct{ x0 float64 }

func (s symlog) forward(x float64) float64 {
	u := math.Log1p(math.Abs(x)/s.x0) / math.Ln10
	if x < 0 {
		return -u
	}
	return u
}

func (s symlog) inverse(u float64) float64 {
	x := s.x0 * math.Expm1(math.Abs(u)*math.Ln10)
	if u < 0 {
		return -x
	}
	return x
}

// residueRel is the size, relative to a root's magnitude |s|, below which
// its real or imaginary part is drawn as zero. Root finders leave such
// residue on real roots (a spurious ±j part) and on jω-axis roots; a true
// part this small would mean a quality factor above 1/(2·residueRel) = 5·10⁵,
// beyond any transistor circuit.
const residueRel = 1e-6

// cleanRoot returns r with parts below residueRel·|r| set to zero.
func cleanRoot(r complex128) complex128 {
	m := math.Hypot(real(r), imag(r))
	re, im := real(r), imag(r)
	if math.Abs(re) <= residueRel*m {
		re = 0
	}
	if math.Abs(im) <= residueRel*m {
		im = 0
	}
	return complex(re, im)
}

// autoX0 picks the symlog scale x0 in rad/s for a set of (cleaned) roots:
// the power of ten at least one decade below the smallest nonzero real or
// imaginary part m, x0 = 10^(⌊log10 m⌋ − 1). Then the smallest part sits
// between u = 1.04 and u = 2 from the axis, a glyph's width clear of the
// origin, and every decade above it is one unit wide. With no nonzero
// part, x0 = 1 rad/s.
func autoX0(roots []complex128) float64 {
	m := math.Inf(1)
	for _, r := range roots {
		for _, v := range []float64{math.Abs(real(r)), math.Abs(imag(r))} {
			if v > 0 && v < m {
				m = v
			}
		}
	}
	if math.IsInf(m, 1) {
		return 1
	}
	return math.Pow(10, math.Floor(math.Log10(m))-1)
}
