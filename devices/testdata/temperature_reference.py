#!/usr/bin/env python3
"""Reference values for devices/thermal_test.go, computed independently of the
Go code with Python's decimal module (40 significant digits).

Sources: k and q are the exact SI values (SI Brochure, 9th edition, 2019);
the scaling laws are those written in /work/shared/DESIGN.md, section
"Models and their equations". Run: python3 temperature_reference.py
"""
from decimal import Decimal as D, getcontext

getcontext().prec = 40
k = D("1.380649e-23")
q = D("1.602176634e-19")


def vt(t):
    return k * t / q


def is_t(is0, n, eta, eg, t, t0):
    # Is(T) = Is·(T/T0)^(η/n)·exp((Eg/(n·VT(T)))·(T/T0 − 1)), Eg in eV
    r = t / t0
    return is0 * (r.ln() * eta / n).exp() * (eg / (n * vt(t)) * (r - 1)).exp()


def ratio_pow(x, t, t0, e):
    return x * ((t / t0).ln() * e).exp()


print("VT(300.15 K) =", vt(D("300.15")))
print("VT(273.15 K) =", vt(D("273.15")))
cases = [
    # Is, n, eta, Eg, T, T0
    ("1e-14", "1", "3", "1.11", "350", "300.15"),
    ("2e-15", "1.8", "3", "1.11", "233.15", "300.15"),
    ("5e-15", "1", "2", "1.12", "398.15", "298.15"),
]
for c in cases:
    is0, n, eta, eg, t, t0 = map(D, c)
    print("Is", c, "->", is_t(is0, n, eta, eg, t, t0))
print("beta 180 * (350/300.15)^1.5 =", ratio_pow(D(180), D(350), D("300.15"), D("1.5")))
print("kp 2e-4 * (350/300.15)^-1.5 =", ratio_pow(D("2e-4"), D(350), D("300.15"), D("-1.5")))
