/**
 * `hf-orbitals`: a demo code that runs a Hartree–Fock calculation of a target with psi4 (tested with
 * Debian's psi4 1.3.2) and writes the orbitals Sigmaflow reads as results (`orbitals.txt`, read by
 * worker/results/readers/orbital-table.ts).
 *
 * The input file is psi4's own input language (Python with a few extra blocks), written as a "text"
 * template: parameter strings come in unquoted (control characters refused), so every value printed into
 * it is either a number, an enum from the parameters schema, or taken from the target context (numbers
 * and names Sigmaflow derived). psi4's input preprocessor strips everything after a '#' on every line and
 * rewrites lines starting with `set`, `molecule`, `basis`, `memory`…, so the Python part writes '#' as
 * chr(35) and starts no line with those words.
 *
 * orbitals.txt, format `sigmaflow-orbitals 1` (whitespace-separated fields, one record per line, '#'
 * starts a comment line, blank lines ignored; energies in hartree, dipole in debye, wavenumbers in cm⁻¹;
 * `none` where a value does not exist):
 *   format sigmaflow-orbitals 1
 *   program <name> <version>
 *   method <rhf|uhf|rohf>
 *   basis <basis set name>
 *   point_group <psi4's point group of the calculation, lower case: c2v, cs, d2h…>
 *   energy_hartree <total SCF energy>
 *   nuclear_repulsion_hartree <E_nn>
 *   dipole_debye <x> <y> <z> | none           (about the origin of the input frame = centre of mass)
 *   rotational_constants_cm1 <A|none> <B|none> <C|none>
 *   frequencies_cm1 <ν1> <ν2> … | none         (harmonic; imaginary ones negative)
 *   orbitals <n>
 *   <label> <irrep> <index_in_irrep> <energy_hartree> <occupation> <kinetic_hartree>     (n lines)
 *   end
 * Orbital lines come in order of energy. `label` is the index in its irrep followed by the irrep in lower
 * case ("1b1"); an unrestricted calculation writes each spin's orbitals, labels ending ".alpha"/".beta",
 * occupations 0 or 1. `kinetic_hartree` is ⟨φ|−½∇²|φ⟩ = (CᵀTC)ᵢᵢ in the symmetry-adapted basis.
 *
 * Harmonic frequencies are those of the target's own geometry, which is not optimized at this level of
 * theory: translations and rotations are projected out even where the gradient is not zero, so that the
 * list holds the 3N − 6 (3N − 5 linear) vibrations; away from the Hartree–Fock minimum they are an estimate.
 */
import type { CodeDefinitionInput } from "../../../shared/schemas/codes";

/** psi4 basis set names offered (psi4's own spelling). */
export const HF_ORBITALS_BASIS_SETS = ["sto-3g", "6-31g*", "cc-pvdz", "aug-cc-pvdz", "cc-pvtz"] as const;

const INPUT_TEMPLATE = String.raw`molecule sigmaflow_target {
{{ target.charge }} {{ target.multiplicity }}
{% for atom in target.atoms %}{{ atom.symbol }}@{{ atom.massU.toPrecision(15) }} {{ atom.x.toFixed(10) }} {{ atom.y.toFixed(10) }} {{ atom.z.toFixed(10) }}
{% endfor %}units angstrom
no_reorient
no_com
symmetry {{ target.abelianSubgroup.toLowerCase() }}
}

set {
  basis {{ basis }}
  reference {% if reference is defined %}{{ reference }}{% elif target.multiplicity == 1 %}rhf{% else %}uhf{% endif %}
  scf_type pk
  e_convergence {{ scfConvergence }}
  d_convergence {{ scfConvergence }}
  maxiter 200
}

import numpy

steps_total = {% if frequencies %}5{% else %}4{% endif %}
expected_point_group = "{{ target.abelianSubgroup.toLowerCase() }}"
with_frequencies = {% if frequencies %}True{% else %}False{% endif %}


def report_progress(done):
    print("progress %d/%d" % (done, steps_total), flush=True)


report_progress(1)
scf_energy, wfn = energy("scf", return_wfn=True)
report_progress(2)

mol = wfn.molecule()
point_group = mol.point_group().symbol().lower()
if point_group != expected_point_group:
    raise Exception("psi4 ran in point group %s, not in the target's %s" % (point_group, expected_point_group))
char_table = mol.point_group().char_table()
irrep_names = {"Ap": "A'", "App": "A\""}
irreps = [irrep_names.get(s, s) for s in (char_table.gamma(h).symbol() for h in range(wfn.nirrep()))]

mints = psi4.core.MintsHelper(wfn.basisset())
kinetic_so = mints.so_kinetic()
overlap_so = mints.so_overlap()
restricted = wfn.same_a_b_orbs()
if restricted:
    spins = [("", wfn.Ca(), wfn.epsilon_a(), wfn.doccpi(), wfn.soccpi())]
else:
    spins = [(".alpha", wfn.Ca(), wfn.epsilon_a(), wfn.nalphapi(), None),
             (".beta", wfn.Cb(), wfn.epsilon_b(), wfn.nbetapi(), None)]

orbitals = []
for suffix, coefficients, energies, filled, half_filled in spins:
    for h in range(wfn.nirrep()):
        count = energies.dimpi()[h]
        if count == 0:
            continue
        c = numpy.asarray(coefficients.nph[h])
        normalisation = c.T.dot(numpy.asarray(overlap_so.nph[h])).dot(c)
        if numpy.abs(normalisation - numpy.eye(count)).max() > 1e-6:
            raise Exception("orbitals of irrep %s are not orthonormal in the SO basis" % irreps[h])
        kinetic = numpy.diag(c.T.dot(numpy.asarray(kinetic_so.nph[h])).dot(c))
        eps = numpy.asarray(energies.nph[h])
        for i in range(count):
            if not restricted:
                occupation = 1 if i < filled[h] else 0
            elif i < filled[h]:
                occupation = 2
            elif i < filled[h] + half_filled[h]:
                occupation = 1
            else:
                occupation = 0
            label = "%d%s%s" % (i + 1, irreps[h].lower(), suffix)
            orbitals.append((float(eps[i]), label, irreps[h], i + 1, occupation, float(kinetic[i])))
orbitals.sort(key=lambda o: (o[0], o[1]))

dipole = [psi4.core.variable("SCF DIPOLE " + axis) for axis in "XYZ"]
rotational = [float(b) for b in mol.rotational_constants().to_array()]
report_progress(3)

frequencies = None
if with_frequencies:
    frequency_energy, frequency_wfn = frequency("scf", return_wfn=True, project_trans=True, project_rot=True)
    frequencies = [float(v) for v in frequency_wfn.frequencies().to_array()]
    report_progress(4)


def number(value):
    return repr(float(value))


def number_or_none(value):
    return "none" if value is None or not numpy.isfinite(value) or value == 0.0 else number(value)


lines = [
    chr(35) + " Hartree-Fock orbitals written by the Sigmaflow demo code hf-orbitals",
    "format sigmaflow-orbitals 1",
    "program psi4 " + psi4.__version__,
    "method " + psi4.core.get_option("SCF", "REFERENCE").lower(),
    "basis " + wfn.basisset().name().lower(),
    "point_group " + point_group,
    "energy_hartree " + number(scf_energy),
    "nuclear_repulsion_hartree " + number(mol.nuclear_repulsion_energy()),
    "dipole_debye " + " ".join(number(d) for d in dipole),
    "rotational_constants_cm1 " + " ".join(number_or_none(b) for b in rotational),
    "frequencies_cm1 " + ("none" if frequencies is None else " ".join(number(v) for v in frequencies)),
    "orbitals %d" % len(orbitals),
]
for eps, label, irrep, index, occupation, kinetic in orbitals:
    lines.append("%s %s %d %s %d %s" % (label, irrep, index, number(eps), occupation, number(kinetic)))
lines.append("end")
with open("orbitals.txt", "w") as handle:
    handle.write("\n".join(lines) + "\n")
report_progress(steps_total)
`;

export const hfOrbitalsCode = {
  name: "hf-orbitals",
  version: "1.0",
  description:
    "Hartree–Fock (psi4) for the run's target: orbital energies, occupations and kinetic energies by irreducible " +
    "representation, total energy, dipole moment and rotational constants, optionally harmonic frequencies. " +
    "Writes orbitals.txt, which Sigmaflow reads as the run's results.",
  executable: "psi4",
  arguments: ["input.dat", "output.dat"],
  inputTemplates: [{ fileName: "input.dat", format: "text", template: INPUT_TEMPLATE }],
  parameters: {
    type: "object",
    additionalProperties: false,
    properties: {
      basis: {
        type: "string",
        enum: [...HF_ORBITALS_BASIS_SETS],
        default: "cc-pvdz",
        description: "Gaussian basis set (psi4's name).",
      },
      reference: {
        type: "string",
        enum: ["rhf", "uhf", "rohf"],
        description: "Hartree–Fock reference; left out: rhf for a singlet, uhf otherwise.",
      },
      frequencies: {
        type: "boolean",
        default: false,
        description:
          "Also compute harmonic vibrational frequencies at the target's geometry (a Hessian; slower; not optimized first).",
      },
      scfConvergence: {
        type: "number",
        minimum: 1e-12,
        maximum: 1e-4,
        default: 1e-8,
        description: "SCF convergence threshold on the energy (hartree) and on the density.",
      },
    },
  },
  outputFiles: ["orbitals.txt"],
  outputRules: {
    progress: ["^progress (?<done>[0-9]+)/(?<total>[0-9]+)$"],
    timings: [],
  },
  resultFiles: [{ fileName: "orbitals.txt", reader: "orbital-table" }],
  defaults: { cores: 1, wallTimeMinutes: 10 },
} satisfies CodeDefinitionInput;
