#!/usr/bin/env python3
"""Arbitrary-precision reference values for Sigmaflow's science tests (mpmath, 400 significant digits).

Reads {"formula": "dipole-born" | "beb", "cases": [...]} as JSON on stdin and prints
{"results": ["<decimal string>", ...]} on stdout: one value per case, as a decimal string with 30
significant digits so that values beyond the double range survive the trip.

Each formula is evaluated exactly as written in its reference, with no rearrangement for rounding: at
400 digits the cancellations that double precision suffers are harmless.

Constants: CODATA 2018 (E. Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021); NIST,
physics.nist.gov/constants), typed here from that table, the SI-defining ones exact.
"""
import json
import sys

from mpmath import mp, mpf, log, pi, sqrt

mp.dps = 400

# SI-defining constants (exact).
PLANCK_J_S = mpf("6.62607015e-34")
SPEED_OF_LIGHT_M_PER_S = mpf("299792458")
ELEMENTARY_CHARGE_C = mpf("1.602176634e-19")
# CODATA 2018 recommended values.
HARTREE_EV = mpf("27.211386245988")
RYDBERG_EV = mpf("13.605693122994")
BOHR_RADIUS_ANGSTROM = mpf("0.529177210903")
ATOMIC_UNIT_DIPOLE_C_M = mpf("8.4783536255e-30")
# Derived: 1 cm^-1 in eV (h c / e per cm), 1 debye = 1e-21/c C m.
EV_PER_CM1 = PLANCK_J_S * SPEED_OF_LIGHT_M_PER_S * 100 / ELEMENTARY_CHARGE_C
DEBYE_C_M = mpf("1e-21") / SPEED_OF_LIGHT_M_PER_S


def dipole_born(case):
    """sigma(J -> J') = (8 pi/3)(mu^2/k^2) F ln[(k + k')/|k - k'|] a0^2 in A^2 (Itikawa & Mason,
    Phys. Rep. 414, 1 (2005)), k^2 = 2E/E_h, k'^2 = 2(E - dE)/E_h, dE = B[J'(J'+1) - J(J+1)]."""
    j, jf, kp = case["j"], case["jFinal"], case.get("kProjection", 0)
    b = mpf(case["rotationalConstantCm1"]) * EV_PER_CM1
    energy = mpf(case["energyEv"])
    delta = b * (jf * (jf + 1) - j * (j + 1))
    if energy <= delta:
        return mpf(0)
    mu = mpf(case["dipoleDebye"]) * DEBYE_C_M / ATOMIC_UNIT_DIPOLE_C_M
    if jf > j:
        factor = mpf((j + 1) ** 2 - kp * kp) / ((j + 1) * (2 * j + 1))
    else:
        factor = mpf(j * j - kp * kp) / (j * (2 * j + 1))
    k = sqrt(2 * energy / HARTREE_EV)
    k_final = sqrt(2 * (energy - delta) / HARTREE_EV)
    return 8 * pi / 3 * mu**2 / k**2 * factor * log((k + k_final) / abs(k - k_final)) * BOHR_RADIUS_ANGSTROM**2


def beb(case):
    """BEB: t = T/B, u = U/B, S = 4 pi a0^2 N (R/B)^2,
    sigma = S/(t + u + 1) [ (ln t/2)(1 - 1/t^2) + 1 - 1/t - ln t/(t + 1) ] for T > B, in A^2
    (Y.-K. Kim and M. E. Rudd, Phys. Rev. A 50, 3954 (1994))."""
    b = mpf(case["bindingEv"])
    t = mpf(case["energyEv"]) / b
    if t <= 1:
        return mpf(0)
    u = mpf(case["kineticEv"]) / b
    s = 4 * pi * BOHR_RADIUS_ANGSTROM**2 * mpf(case["occupation"]) * (RYDBERG_EV / b) ** 2
    bracket = log(t) / 2 * (1 - 1 / t**2) + 1 - 1 / t - log(t) / (t + 1)
    return s / (t + u + 1) * bracket


FORMULAS = {"dipole-born": dipole_born, "beb": beb}


def main():
    request = json.load(sys.stdin)
    formula = FORMULAS[request["formula"]]
    json.dump({"results": [mp.nstr(formula(case), 30) for case in request["cases"]]}, sys.stdout)


if __name__ == "__main__":
    main()
