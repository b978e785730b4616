"""Reference for tests/unit/demo-codes/orbitals-to-elastic.test.ts: psi4's own electronic second moment.

Request (JSON on stdin): {"atoms": [{"symbol", "massU", "x", "y", "z"}] (angstrom, centre of mass at 0),
"charge", "multiplicity", "basis"}. Runs RHF with psi4 on the same frame (no_com, no_reorient) and prints
{"electrons": N, "secondMomentBohr2": <sum of x^2 + y^2 + z^2 over the electrons>} computed from psi4's
AO quadrupole integrals about the origin and the AO density matrix, with no spatial grid at all.
"""

import json
import sys

import numpy
import psi4

request = json.load(sys.stdin)
psi4.core.be_quiet()
psi4.core.set_num_threads(1)
lines = ["%d %d" % (request["charge"], request["multiplicity"])]
for atom in request["atoms"]:
    lines.append("%s@%.15g %.10f %.10f %.10f" % (atom["symbol"], atom["massU"], atom["x"], atom["y"], atom["z"]))
lines += ["units angstrom", "no_reorient", "no_com", "symmetry c1"]
psi4.geometry("\n".join(lines))
psi4.set_options({"basis": request["basis"], "scf_type": "pk", "e_convergence": 1e-10, "d_convergence": 1e-10})
energy, wfn = psi4.energy("scf", return_wfn=True)
density = numpy.asarray(wfn.Da_subset("AO")) + numpy.asarray(wfn.Db_subset("AO"))
quadrupole = [numpy.asarray(m) for m in psi4.core.MintsHelper(wfn.basisset()).ao_quadrupole()]
# psi4 orders the six components xx, xy, xz, yy, yz, zz and includes the electron's charge (-1).
second_moment = -float(numpy.sum(density * (quadrupole[0] + quadrupole[3] + quadrupole[5])))
json.dump({"electrons": wfn.nalpha() + wfn.nbeta(), "secondMomentBohr2": second_moment, "energyHartree": energy}, sys.stdout)
