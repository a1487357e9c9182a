// Package explain turns the poles and zeros of a linear circuit into the
// answers of hand analysis: which elements set each root, what the
// open-circuit and short-circuit time-constant estimates of the band edges
// say and how far they are off, what each port looks like from outside
// (Thevenin and Norton equivalents) and a mid-band summary in words.
//
// The circuit is the linear incremental one (package smallsignal), the
// transfer one of the six kinds of package ac; its equations are those of
// ac.Setup,
//
//	(G + s·C)·x = B·u,   y = Out·x,
//
// whose first unknowns are exactly mna.Build's for the same circuit (Setup
// appends its test branches after them), so that each part's stamp, taken
// from mna's layout, applies unchanged to the transfer's pencil.
//
// Element values. Every linear part with a value is an element: resistors
// (x = R in Ω), capacitors (F), inductors (H), vcvs and cccs gains (V/V,
// A/A), vccs transconductances (S) and ccvs transresistances (Ω). The
// parts that stand for a device are named after it (Q1_c_mu, M1_gds,
// Q1.base_resistance) and labelled "Q1 c_mu". Sensitivity to a resistance
// is the negative of the sensitivity to its conductance, S_R = −S_G.
//
// Sign conventions are those of package mna; roots are in rad/s,
// frequencies in Hz, time constants in s, resistances in Ω.
package explain
