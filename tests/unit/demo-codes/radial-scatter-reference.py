"""Reference values for the radial-scatter tests, from scipy (Debian's python3-scipy), independent of the
program under test. One JSON request on stdin, one JSON answer on stdout:

  {"bessel": [[l, x], ...]}
      -> spherical Bessel j_l(x), y_l(x) (scipy.special.spherical_jn / spherical_yn)
  {"characters": {"lmax": L, "operations": [[sx, sy, sz], ...]}}
      -> for each (l, m), the character of the real spherical harmonic Y_lm under each operation
         diag(sx, sy, sz), found numerically: Y_lm(S n) / Y_lm(n) at random directions n, with Y_lm built
         from scipy.special.sph_harm (m > 0: Re Y_l^m, m < 0: Im Y_l^|m|, m = 0: Y_l^0)
  {"hydrogen": [{"l": l, "energyEv": E, "offsetBohr": d}, ...]}
      -> tan(delta_l) of an electron in the static potential of a hydrogen atom in its ground state whose
         nucleus sits d bohr from the origin, averaged over directions about the origin, by
         scipy.integrate.solve_ivp (DOP853, rtol 1e-12) and matching to Riccati-Bessel functions at 25 bohr.
         Potential of H(1s) about its nucleus: V(s) = -(1 + 1/s) exp(-2s) hartree (e.g. B. H. Bransden and
         C. J. Joachain, Physics of Atoms and Molecules, 2nd ed., static-exchange chapter; textbook result).
         Its angular average about a point at distance d: <V>(r) = [G(r + d) - G(|r - d|)] / (2 r d) with
         G(s) = (s/2 + 3/4) exp(-2s), since s V(s) = -(s + 1) exp(-2s) = dG/ds; for d = 0, <V> = V.
"""

import json
import sys

import numpy as np
from scipy.integrate import solve_ivp
from scipy.special import sph_harm, spherical_jn, spherical_yn

HARTREE_EV = 27.211386245988  # CODATA 2018


def real_harmonic(l, m, polar, azimuth):
    value = sph_harm(abs(m), l, azimuth, polar)
    if m > 0:
        return value.real
    if m < 0:
        return value.imag
    return value.real


def characters(lmax, operations):
    rng = np.random.default_rng(20240611)
    vectors = rng.normal(size=(64, 3))
    vectors /= np.linalg.norm(vectors, axis=1)[:, None]

    def angles(v):
        return np.arccos(np.clip(v[:, 2], -1, 1)), np.arctan2(v[:, 1], v[:, 0])

    polar, azimuth = angles(vectors)
    result = []
    for l in range(lmax + 1):
        for m in range(-l, l + 1):
            base = real_harmonic(l, m, polar, azimuth)
            use = np.abs(base) > 1e-3 * np.max(np.abs(base))
            row = []
            for signs in operations:
                p2, a2 = angles(vectors * np.array(signs, dtype=float)[None, :])
                ratio = real_harmonic(l, m, p2, a2)[use] / base[use]
                character = float(np.round(np.mean(ratio)))
                if np.max(np.abs(ratio - character)) > 1e-8:
                    raise SystemExit(f"Y({l},{m}) is not an eigenfunction of {signs}")
                row.append(int(character))
            result.append({"l": l, "m": m, "characters": row})
    return result


def hydrogen_tan_delta(l, energy_ev, offset):
    k = np.sqrt(2 * energy_ev / HARTREE_EV)

    def g(s):
        return (s / 2 + 0.75) * np.exp(-2 * s)

    def potential(r):
        if offset == 0:
            return -(1 + 1 / r) * np.exp(-2 * r)
        return (g(r + offset) - g(abs(r - offset))) / (2 * r * offset)

    def rhs(r, y):
        return [y[1], (l * (l + 1) / r**2 + 2 * potential(r) - k * k) * y[0]]

    r0 = 1e-6
    # Regular solution near 0: u = r^(l+1) (1 - Z r/(l+1)) with Z = 1 at the nucleus (cusp), Z = 0 otherwise.
    z0 = 1.0 if offset == 0 else 0.0
    y = [r0 ** (l + 1) * (1 - z0 * r0 / (l + 1)), (l + 1) * r0**l - z0 * (l + 2) / (l + 1) * r0 ** (l + 1)]
    pieces = [r0, offset, 25.0] if offset > 0 else [r0, 25.0]
    for a, b in zip(pieces[:-1], pieces[1:]):
        y = solve_ivp(rhs, (a, b), y, method="DOP853", rtol=1e-12, atol=1e-300).y[:, -1]
    u, du = y
    x = k * 25.0
    jh, nh = x * spherical_jn(l, x), x * spherical_yn(l, x)
    jp = k * (spherical_jn(l, x) + x * spherical_jn(l, x, derivative=True))
    np_ = k * (spherical_yn(l, x) + x * spherical_yn(l, x, derivative=True))
    return float((du * jh - u * jp) / (du * nh - u * np_))


def main():
    request = json.load(sys.stdin)
    answer = {}
    if "bessel" in request:
        answer["bessel"] = [[float(spherical_jn(l, x)), float(spherical_yn(l, x))] for l, x in request["bessel"]]
    if "characters" in request:
        answer["characters"] = characters(request["characters"]["lmax"], request["characters"]["operations"])
    if "hydrogen" in request:
        answer["hydrogen"] = [
            hydrogen_tan_delta(item["l"], item["energyEv"], item["offsetBohr"]) for item in request["hydrogen"]
        ]
    json.dump(answer, sys.stdout)


main()
