/**
 * `hf-orbitals`: a demo code that runs a Hartree–Fock calculation of a target with psi4 (tested with
 * Debian's psi4 1.3.2) and writes the orbitals Sigmaflow reads as results (`orbitals.txt`, read by
 * worker/results/readers/orbital-table.ts) and the spherically averaged electron density (`density.txt`).
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
 * density.txt, always written (it costs 0.3–1 s for the demo targets in cc-pVDZ on one core, so it needs no
 * parameter and the declared outputs stay the same for every run): the Hartree–Fock electron density
 * ρ = Σ_μν D_μν φ_μ φ_ν (D = Dα + Dβ in the AO basis, φ evaluated by psi4's BasisFunctions) averaged over
 * spheres about the origin, i.e. the target's centre of mass, in the densityFile format of the demo solver
 * radial-scatter: '#' comment lines, then `r_bohr 4πr²ρ̄(r)` rows, r from 0 to 30 bohr. The recipe
 * orbitals-to-elastic copies it into the solver's folder, so its static potential is that of this density.
 *  - Radii: 240 on r = 0.02 (e^t − 1) bohr (t uniform: dense near 0, steps ~0.9 bohr at 30 bohr) plus each
 *    nucleus distance d and d ± 0.002…0.3 bohr (ten offsets each side), where the averaged density of an
 *    off-centre core has its sharp peak; rows in between (three per interval) by monotone cubic Hermite
 *    interpolation (Fritsch–Carlson), because the solver interpolates the file linearly.
 *  - Angular average: Gauss–Legendre in cos θ × trapezoid in φ (40 × 80 points, exact for spherical
 *    harmonics up to degree 79; 20 × 40 where no nucleus distance is within 1.5 bohr and r > 1.5 bohr), plus,
 *    for each nucleus whose distance is within 1.5 bohr of r, a cap of half-angle 0.6 rad about its direction
 *    with a graded rule (θ′ = 0.6 t², 24 Gauss–Legendre t × 16 φ′): the sphere is split into the caps and the
 *    rest by a smooth partition of unity (cos² bumps, normalised), so the off-centre nuclear cusps, far
 *    narrower in angle than the global rule resolves, are integrated on their own grid.
 *  - Accuracy (measured): the trapezoidal integral of the file is the electron count within 3·10⁻⁴ relative
 *    for every demo target in cc-pVDZ (nitrogen trifluoride, whose fluorine cores sit 2.3 bohr off centre, is
 *    the worst; the rest is the radial interpolation); the program prints a warning line when it is off by
 *    more than 10⁻³. Raising the global rule to 60 × 120 changes water's ρ̄ by at most 3·10⁻⁶ relative, and
 *    finer caps (40 × 24) change nitrogen trifluoride's integral by 10⁻⁶ electrons.
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

import time

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

density_started = time.time()
electron_count = wfn.nalpha() + wfn.nbeta()
density_ao = numpy.asarray(wfn.Da_subset("AO")) + numpy.asarray(wfn.Db_subset("AO"))
ao_basis = wfn.basisset()
nuclei = numpy.array([[mol.x(i), mol.y(i), mol.z(i)] for i in range(mol.natom())])
nuclear_distances = numpy.sqrt((nuclei ** 2).sum(axis=1))
off_centre = nuclear_distances > 1e-3
cap_axes = nuclei[off_centre] / nuclear_distances[off_centre][:, None]
cap_distances = nuclear_distances[off_centre]

radial_offsets = (0.002, 0.005, 0.01, 0.02, 0.04, 0.07, 0.11, 0.16, 0.22, 0.3)
skeleton = list(0.02 * numpy.expm1(numpy.linspace(0.0, numpy.log(1.0 + 30.0 / 0.02), 240)))
for d in cap_distances:
    skeleton += [d] + [d + s for s in radial_offsets] + [d - s for s in radial_offsets if d - s > 0.0]
skeleton = numpy.array(sorted(v for v in skeleton if 0.0 <= v <= 30.0))
skeleton = skeleton[numpy.concatenate(([True], numpy.diff(skeleton) > 1e-6))]


def product_rule(n_theta):
    cos_theta, weights = numpy.polynomial.legendre.leggauss(n_theta)
    phis = 2.0 * numpy.pi * numpy.arange(2 * n_theta) / (2 * n_theta)
    sin_theta = numpy.sqrt(1.0 - cos_theta ** 2)
    units = numpy.column_stack((numpy.outer(sin_theta, numpy.cos(phis)).ravel(),
                                numpy.outer(sin_theta, numpy.sin(phis)).ravel(),
                                numpy.repeat(cos_theta, len(phis))))
    return units, numpy.repeat(weights, len(phis)) / (4.0 * n_theta)


CAP_HALF_ANGLE = 0.6
CAP_WINDOW_BOHR = 1.5
sphere_fine, sphere_fine_w = product_rule(40)
sphere_coarse, sphere_coarse_w = product_rule(20)
cap_t, cap_tw = numpy.polynomial.legendre.leggauss(24)
cap_t, cap_tw = 0.5 * (cap_t + 1.0), 0.5 * cap_tw
cap_theta = CAP_HALF_ANGLE * cap_t ** 2
cap_phi = 2.0 * numpy.pi * numpy.arange(16) / 16
cap_units_z = numpy.column_stack((numpy.outer(numpy.sin(cap_theta), numpy.cos(cap_phi)).ravel(),
                                  numpy.outer(numpy.sin(cap_theta), numpy.sin(cap_phi)).ravel(),
                                  numpy.repeat(numpy.cos(cap_theta), len(cap_phi))))
cap_w = numpy.repeat(cap_tw * 2.0 * CAP_HALF_ANGLE * cap_t * numpy.sin(cap_theta), len(cap_phi)) / (2.0 * len(cap_phi))


def rotation_onto(axis):
    v = numpy.array([-axis[1], axis[0], 0.0])
    s, c = numpy.linalg.norm(v), axis[2]
    if s < 1e-12:
        return numpy.eye(3) if c > 0 else numpy.diag([1.0, -1.0, -1.0])
    k = numpy.array([[0.0, -v[2], v[1]], [v[2], 0.0, -v[0]], [-v[1], v[0], 0.0]])
    return numpy.eye(3) + k + k.dot(k) * (1.0 - c) / s ** 2


cap_units = [cap_units_z.dot(rotation_onto(a).T) for a in cap_axes]


def partition(units, active):
    angles = numpy.arccos(numpy.clip(units.dot(cap_axes[active].T), -1.0, 1.0))
    bumps = 0.5 * (1.0 + numpy.cos(numpy.pi * numpy.minimum(angles / CAP_HALF_ANGLE, 1.0)))
    rest = numpy.prod(1.0 - bumps, axis=1)
    total = rest + bumps.sum(axis=1)
    return rest / total, bumps / total[:, None]


point_functions = psi4.core.BasisFunctions(ao_basis, 40000, ao_basis.nbf())
extents = psi4.core.BasisExtents(ao_basis, 0.0)


def density_at(points):
    values_out = numpy.empty(len(points))
    for first in range(0, len(points), 40000):
        part = points[first:first + 40000]
        block = psi4.core.BlockOPoints(*[psi4.core.Vector.from_array(numpy.ascontiguousarray(part[:, i])) for i in range(3)],
                                       psi4.core.Vector.from_array(numpy.ones(len(part))), extents)
        point_functions.compute_functions(block)
        local = numpy.asarray(block.functions_local_to_global(), dtype=int)
        phi = numpy.asarray(point_functions.basis_values()["PHI"])[:len(part), :len(local)]
        values_out[first:first + len(part)] = numpy.einsum("pm,pm->p", phi.dot(density_ao[numpy.ix_(local, local)]), phi)
    return values_out


def shell_average(r):
    if r == 0.0:
        return float(density_at(numpy.zeros((1, 3)))[0])
    active = numpy.abs(cap_distances - r) < CAP_WINDOW_BOHR
    near = r < CAP_WINDOW_BOHR or bool(active.any())
    units, weights = (sphere_fine, sphere_fine_w) if near else (sphere_coarse, sphere_coarse_w)
    rest, _ = partition(units, active)
    all_points, all_weights = [r * units], [weights * rest]
    for j in numpy.nonzero(active)[0]:
        _, shares = partition(cap_units[j], active)
        all_points.append(r * cap_units[j])
        all_weights.append(cap_w * shares[:, list(numpy.nonzero(active)[0]).index(j)])
    return float(density_at(numpy.concatenate(all_points)).dot(numpy.concatenate(all_weights)))


skeleton_density = numpy.maximum(4.0 * numpy.pi * skeleton ** 2 * numpy.array([shell_average(r) for r in skeleton]), 0.0)


def monotone_cubic(r, p, split):
    h, slopes = numpy.diff(r), numpy.diff(p) / numpy.diff(r)
    d = numpy.zeros_like(p)
    d[0], d[-1] = slopes[0], slopes[-1]
    for i in range(1, len(p) - 1):
        if slopes[i - 1] * slopes[i] > 0.0:
            w1, w2 = 2.0 * h[i] + h[i - 1], h[i] + 2.0 * h[i - 1]
            d[i] = (w1 + w2) / (w1 / slopes[i - 1] + w2 / slopes[i])
    t = numpy.arange(split) / split
    h00, h10, h01, h11 = 2 * t ** 3 - 3 * t ** 2 + 1, t ** 3 - 2 * t ** 2 + t, 3 * t ** 2 - 2 * t ** 3, t ** 3 - t ** 2
    fine_r = (r[:-1, None] + h[:, None] * t[None, :]).ravel()
    fine_p = (p[:-1, None] * h00 + (h * d[:-1])[:, None] * h10 + p[1:, None] * h01 + (h * d[1:])[:, None] * h11).ravel()
    return numpy.append(fine_r, r[-1]), numpy.maximum(numpy.append(fine_p, p[-1]), 0.0)


radii, radial_density = monotone_cubic(skeleton, skeleton_density, 4)
density_integral = float(numpy.sum(0.5 * (radial_density[1:] + radial_density[:-1]) * numpy.diff(radii)))
if abs(density_integral - electron_count) > 1e-3 * max(electron_count, 1):
    print("warning: density.txt integrates to %.6f electrons, not %d" % (density_integral, electron_count), flush=True)
density_lines = [
    chr(35) + " Hartree-Fock electron density spherically averaged about the origin (the centre of mass of the target)",
    chr(35) + " written by the Sigmaflow demo code hf-orbitals: psi4 %s, %s, basis %s, %d electrons"
    % (psi4.__version__, psi4.core.get_option("SCF", "REFERENCE").lower(), ao_basis.name().lower(), electron_count),
    chr(35) + " %d radii evaluated, each averaged over a Gauss-Legendre x trapezoid product rule (40 x 80 points"
    % len(skeleton),
    chr(35) + " within 1.5 bohr of a nucleus distance, 20 x 40 elsewhere) plus a graded cap about each nearby nucleus;",
    chr(35) + " rows between them by monotone cubic interpolation. Trapezoidal integral over r: %.6f electrons"
    % density_integral,
    chr(35) + " r_bohr 4*pi*r^2*rho(r)_electrons_per_bohr",
]
density_lines += ["%.8f %.10e" % (r, p) for r, p in zip(radii, radial_density)]
with open("density.txt", "w") as handle:
    handle.write("\n".join(density_lines) + "\n")
print("density.txt: %d radii, %.6f electrons, %.2f s" % (len(skeleton), density_integral, time.time() - density_started), flush=True)

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
    "Writes orbitals.txt, which Sigmaflow reads as the run's results, and density.txt, the electron density " +
    "averaged over spheres about the centre of mass, which the demo solver radial-scatter reads as its static " +
    "potential's density in the recipe orbitals-to-elastic.",
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
  outputFiles: ["orbitals.txt", "density.txt"],
  outputRules: {
    progress: ["^progress (?<done>[0-9]+)/(?<total>[0-9]+)$"],
    timings: [],
  },
  resultFiles: [{ fileName: "orbitals.txt", reader: "orbital-table" }],
  defaults: { cores: 1, wallTimeMinutes: 10 },
} satisfies CodeDefinitionInput;
