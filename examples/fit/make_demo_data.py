#!/usr/bin/env python3
"""Writes compound-a.csv: INVENTED test data of an imaginary filled rubber
("compound A") for trying `olli fit`. These are not measurements of any real
material: the curves come from chosen constants plus seeded random noise.

Chosen constants (MPa): a two-term Ogden model (Ogden 1972, Proc. R. Soc.
Lond. A 326:565-584) with mu = [0.55, 0.0015], alpha = [1.6, 6.5] (small-strain
shear modulus 0.5*sum(mu*alpha) = 0.4449), and a quadratic volumetric law with
bulk modulus 1500. Incompressible nominal stresses:
  uniaxial     P = sum mu (l^(a-1) - l^(-a/2-1))
  equibiaxial  P = sum mu (l^(a-1) - l^(-2a-1))
  planar       P = sum mu (l^(a-1) - l^(-a-1))
  volumetric   P11 = l^2 K (J - 1), J = l^3
Noise: 1.5 % relative plus 0.002 MPa absolute, normal, seed 20240612.

Run: python3 make_demo_data.py  (writes compound-a.csv beside this script)
"""
import os
import random

MU = [0.55, 0.0015]
ALPHA = [1.6, 6.5]
BULK = 1500.0

def ogden(mode, l):
    total = 0.0
    for mu, a in zip(MU, ALPHA):
        lateral = {"uniaxial": -a / 2 - 1, "equibiaxial": -2 * a - 1, "planar": -a - 1}[mode]
        total += mu * (l ** (a - 1) - l ** lateral)
    return total

def stretches(lo, hi, n):
    return [lo + (hi - lo) * i / (n - 1) for i in range(n)]

def main():
    rng = random.Random(20240612)
    noisy = lambda s: s * (1 + 0.015 * rng.gauss(0, 1)) + 0.002 * rng.gauss(0, 1)
    rows = []
    for mode, lo, hi, n in [("uniaxial", 1.05, 4.0, 24), ("equibiaxial", 1.05, 2.6, 16), ("planar", 1.05, 3.0, 16)]:
        rows += [(mode, l, noisy(ogden(mode, l))) for l in stretches(lo, hi, n)]
    rows += [("uniaxial", l, noisy(ogden("uniaxial", l))) for l in stretches(0.7, 0.95, 6)]
    for l in stretches(0.9975, 0.9999, 8):
        rows.append(("volumetric", l, noisy(l * l * BULK * (l ** 3 - 1))))
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "compound-a.csv")
    with open(path, "w") as f:
        f.write("# INVENTED demo data for `olli fit`, not measurements: written by make_demo_data.py\n")
        f.write("# from chosen two-term Ogden constants (mu = [0.55, 0.0015] MPa, alpha = [1.6, 6.5],\n")
        f.write("# bulk modulus 1500 MPa) with 1.5 % + 0.002 MPa seeded random noise. Stresses in MPa.\n")
        f.write("mode,stretch,nominal_stress\n")
        for mode, l, s in rows:
            f.write(f"{mode},{l:.6f},{s:.6g}\n")

if __name__ == "__main__":
    main()
