#!/usr/bin/env python3
"""Independent reference values for Sigmaflow's target tests and benchmark.

Reads {"tool": "pymatgen" | "psi4", "molecules": [{"name", "symbols", "massNumbers", "massesU",
"positionsAngstrom"}]} as JSON on stdin and prints {"results": [...]} as JSON on stdout.

pymatgen: full point group from pymatgen.symmetry.analyzer.PointGroupAnalyzer, timed per molecule.
  Atoms of a non-default isotope must not be equivalent to the others, and pymatgen knows only element
  symbols, so each further isotope of an element is relabelled as an element not present in the molecule,
  the one whose standard atomic weight is closest to the isotope mass: the symmetry is exactly that of the
  isotopologue (the centre of mass stays on every symmetry element) and the inertia tensor stays close to
  the real one (pymatgen's search starts from the principal axes).
psi4: geometry only, no SCF: psi4.geometry(...) with explicit isotope masses ("H@2.014..."), then
  schoenflies_symbol() (psi4 finds the largest D2h subgroup), rotational_constants() (cm^-1) and
  nuclear_repulsion_energy() (hartree).
"""
import json
import sys
import time


def run_pymatgen(molecules, tolerance, eigen_tolerance):
    from pymatgen.core import Molecule
    from pymatgen.symmetry.analyzer import PointGroupAnalyzer

    from pymatgen.core.periodic_table import Element

    results = []
    for molecule in molecules:
        present = set(molecule["symbols"])
        # The most common isotope of each element in this molecule keeps the element's own symbol.
        counts = {}
        for key in zip(molecule["symbols"], molecule["massNumbers"]):
            counts[key] = counts.get(key, 0) + 1
        labels = {}
        for (symbol, mass_number), _ in sorted(counts.items(), key=lambda item: -item[1]):
            if symbol not in labels.values():
                labels[(symbol, mass_number)] = symbol
        species = []
        for symbol, mass_number, mass in zip(molecule["symbols"], molecule["massNumbers"], molecule["massesU"]):
            key = (symbol, mass_number)
            if key not in labels:
                candidates = [e for e in Element if e.Z <= 92 and e.symbol not in present]
                stand_in = min(candidates, key=lambda e: abs(float(e.atomic_mass) - mass))
                present.add(stand_in.symbol)
                labels[key] = stand_in.symbol
            species.append(labels[key])
        mol = Molecule(species, molecule["positionsAngstrom"])
        start = time.perf_counter()
        analyzer = PointGroupAnalyzer(mol, tolerance=tolerance, eigen_tolerance=eigen_tolerance)
        symbol = analyzer.sch_symbol
        seconds = time.perf_counter() - start
        results.append(
            {
                "name": molecule["name"],
                "pointGroup": symbol.replace("*", "∞"),
                "operations": len(analyzer.get_symmetry_operations()) if "*" not in symbol else None,
                "seconds": seconds,
            }
        )
    return results


def run_psi4(molecules):
    import psi4

    psi4.core.be_quiet()
    results = []
    for molecule in molecules:
        lines = ["units angstrom"]
        for symbol, mass, position in zip(molecule["symbols"], molecule["massesU"], molecule["positionsAngstrom"]):
            lines.append("%s@%.11f %.12f %.12f %.12f" % (symbol, mass, position[0], position[1], position[2]))
        geometry = psi4.geometry("\n".join(lines), name="m%d" % len(results))
        geometry.update_geometry()
        results.append(
            {
                "name": molecule["name"],
                "abelianSubgroup": geometry.schoenflies_symbol(),
                "rotationalConstantsCm1": list(geometry.rotational_constants().to_array()),
                "nuclearRepulsionHartree": geometry.nuclear_repulsion_energy(),
            }
        )
    return results


def main():
    request = json.load(sys.stdin)
    if request["tool"] == "pymatgen":
        results = run_pymatgen(request["molecules"], request.get("tolerance", 0.3), request.get("eigenTolerance", 0.01))
    elif request["tool"] == "psi4":
        results = run_psi4(request["molecules"])
    else:
        raise SystemExit("unknown tool %r" % request["tool"])
    json.dump({"results": results}, sys.stdout)


if __name__ == "__main__":
    main()
