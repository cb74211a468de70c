#!/usr/bin/env python3
"""Writes a synthetic LHEF 3.0 file of mono-jet-like events for timing only.

Each event is g g -> Y1 g, Y1 -> chi chi~ (PDG 55, 52, -52, 21) with invented,
roughly realistic kinematics (falling jet pT, isotropic mediator decay).
The numbers are NOT physics results; the file only exercises the reader,
the detector and the selection at realistic event sizes.

usage: gen-lhef.py OUT.lhe [N_EVENTS] [SEED]
"""
import math
import random
import sys

M_MED = 1000.0  # GeV, invented
M_DM = 10.0     # GeV, invented
E_BEAM = 6800.0 # GeV, 13.6 TeV collisions
XSEC_PB = 0.5   # invented


def boost(p, b):
    bx, by, bz = b
    b2 = bx * bx + by * by + bz * bz
    if b2 == 0.0:
        return p
    g = 1.0 / math.sqrt(1.0 - b2)
    bp = bx * p[1] + by * p[2] + bz * p[3]
    g2 = (g - 1.0) / b2
    e = g * (p[0] + bp)
    return (e, p[1] + g2 * bp * bx + g * bx * p[0],
            p[2] + g2 * bp * by + g * by * p[0],
            p[3] + g2 * bp * bz + g * bz * p[0])


def line(pid, status, m1, m2, c1, c2, p, m):
    return (f" {pid:8d} {status:2d} {m1:4d} {m2:4d} {c1:4d} {c2:4d}"
            f" {p[1]:+.10e} {p[2]:+.10e} {p[3]:+.10e} {p[0]:.10e} {m:.10e} 0.0000e+00 9.0000e+00\n")


def main():
    out = sys.argv[1]
    n = int(sys.argv[2]) if len(sys.argv) > 2 else 200_000
    rng = random.Random(int(sys.argv[3]) if len(sys.argv) > 3 else 1)
    with open(out, "w") as f:
        f.write('<LesHouchesEvents version="3.0">\n<header>\n'
                '<!-- synthetic events for timing; invented kinematics -->\n</header>\n')
        f.write("<init>\n")
        f.write(f" 2212 2212 {E_BEAM:.6e} {E_BEAM:.6e} 0 0 247000 247000 3 1\n")
        f.write(f" {XSEC_PB:.6e} {XSEC_PB * 0.01:.6e} 1.0 1\n</init>\n")
        for _ in range(n):
            pt = 100.0 + rng.expovariate(1.0 / 200.0)
            eta = rng.uniform(-2.5, 2.5)
            phi = rng.uniform(-math.pi, math.pi)
            jet = (pt * math.cosh(eta), pt * math.cos(phi), pt * math.sin(phi), pt * math.sinh(eta))
            pz = rng.gauss(0.0, 600.0)
            px, py = -jet[1], -jet[2]
            e = math.sqrt(M_MED ** 2 + px * px + py * py + pz * pz)
            med = (e, px, py, pz)
            q = math.sqrt(M_MED ** 2 / 4.0 - M_DM ** 2)
            ct = rng.uniform(-1.0, 1.0)
            st = math.sqrt(1.0 - ct * ct)
            ph = rng.uniform(-math.pi, math.pi)
            d1 = (M_MED / 2.0, q * st * math.cos(ph), q * st * math.sin(ph), q * ct)
            d2 = (M_MED / 2.0, -d1[1], -d1[2], -d1[3])
            b = (med[1] / med[0], med[2] / med[0], med[3] / med[0])
            d1, d2 = boost(d1, b), boost(d2, b)
            etot = med[0] + jet[0]
            pztot = med[3] + jet[3]
            g1 = ((etot + pztot) / 2.0, 0.0, 0.0, (etot + pztot) / 2.0)
            g2 = ((etot - pztot) / 2.0, 0.0, 0.0, -(etot - pztot) / 2.0)
            f.write("<event>\n")
            f.write(f" 6 1 {XSEC_PB:.6e} {M_MED:.6e} 7.546771e-03 1.180000e-01\n")
            f.write(line(21, -1, 0, 0, 501, 502, g1, 0.0))
            f.write(line(21, -1, 0, 0, 503, 501, g2, 0.0))
            f.write(line(55, 2, 1, 2, 0, 0, med, M_MED))
            f.write(line(21, 1, 1, 2, 503, 502, jet, 0.0))
            f.write(line(52, 1, 3, 3, 0, 0, d1, M_DM))
            f.write(line(-52, 1, 3, 3, 0, 0, d2, M_DM))
            f.write("</event>\n")
        f.write("</LesHouchesEvents>\n")


if __name__ == "__main__":
    main()
