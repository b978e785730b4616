import type { TargetDetail } from "@shared/schemas";
import { Link } from "react-router-dom";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDateTime } from "@/lib/format";
import { Formula } from "@/lib/formula";
import { paths } from "@/lib/paths";

/** Fixed decimals for coordinates (Å), as geometry files print them. */
const coordinate = (value: number) => value.toFixed(6);
/** Six significant digits for derived constants. */
const constant = (value: number | null) => (value === null ? "—" : String(Number(value.toPrecision(6))));
const triple = (values: readonly (number | null)[], format: (value: number | null) => string) =>
  values.map(format).join(", ");

const ROTOR_WORDS: Record<TargetDetail["current"]["derived"]["rotorType"], string> = {
  atom: "atom (no rotation)",
  linear: "linear",
  spherical: "spherical top",
  prolate: "prolate symmetric top",
  oblate: "oblate symmetric top",
  asymmetric: "asymmetric top",
};

function Property({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-xs text-ink-500">{label}</dt>
      <dd className="font-mono text-sm text-ink-900">{children}</dd>
    </div>
  );
}

/** A target's current version: atoms, charge and spin, what Sigmaflow derives from them, and its history. */
export function TargetDetailView({ target }: { target: TargetDetail }) {
  const version = target.current;
  const derived = version.derived;
  return (
    <div className="flex flex-col gap-6">
      <Card>
        <CardHeader
          title={`Version ${version.version}`}
          description={`Saved ${formatDateTime(version.createdAt)}${version.createdByName ? ` by ${version.createdByName}` : ""}`}
        />
        <CardBody>
          <dl className="grid gap-4 sm:grid-cols-3">
            <Property label="Formula">
              <Formula formula={derived.formula} />
            </Property>
            <Property label="Point group / Abelian subgroup">
              {derived.pointGroup} / {derived.abelianSubgroup}
            </Property>
            <Property label="Charge / multiplicity">
              {version.charge} / {version.multiplicity}
            </Property>
            <Property label="Electrons">{derived.electronCount}</Property>
            <Property label="Total mass (u)">{constant(derived.totalMassU)}</Property>
            <Property label="Rotor type">{ROTOR_WORDS[derived.rotorType]}</Property>
            <Property label="Centre of mass (Å)">{triple(derived.centreOfMassAngstrom, constant)}</Property>
            <Property label="Rotational constants A, B, C (cm⁻¹)">
              {triple(derived.rotationalConstantsCm1, constant)}
            </Property>
            <Property label="Rotational constants A, B, C (MHz)">
              {triple(derived.rotationalConstantsMHz, constant)}
            </Property>
            <Property label="Nuclear repulsion (Eₕ)">{constant(derived.nuclearRepulsionHartree)}</Property>
            {derived.dipole ? (
              <Property label="Dipole from partial charges (D)">
                {constant(derived.dipole.magnitudeDebye)} ({triple(derived.dipole.debye, constant)})
              </Property>
            ) : null}
          </dl>
          {version.notes ? (
            <p className="mt-4 text-sm whitespace-pre-line text-ink-700">{version.notes}</p>
          ) : null}
        </CardBody>
      </Card>

      <section>
        <h2 className="mb-3 text-sm font-semibold text-ink-900">Atoms</h2>
        <Table caption={`Atoms of ${target.name}, version ${version.version}`}>
          <THead>
            <TR>
              <TH>#</TH>
              <TH>Element</TH>
              <TH>Mass number</TH>
              <TH>x (Å)</TH>
              <TH>y (Å)</TH>
              <TH>z (Å)</TH>
            </TR>
          </THead>
          <TBody>
            {version.atoms.map((atom, index) => {
              const resolved = derived.atoms[index];
              return (
                // biome-ignore lint/suspicious/noArrayIndexKey: an atom's place in the version is its identity
                <TR key={index}>
                  <TD className="font-mono text-xs">{index + 1}</TD>
                  <TD>{atom.symbol}</TD>
                  <TD className="font-mono text-xs">
                    {atom.massNumber ?? (
                      <span title="No isotope was chosen: the most common one is used">
                        {resolved?.massNumber ?? "—"} (most common)
                      </span>
                    )}
                  </TD>
                  <TD className="font-mono text-xs">{coordinate(atom.xAngstrom)}</TD>
                  <TD className="font-mono text-xs">{coordinate(atom.yAngstrom)}</TD>
                  <TD className="font-mono text-xs">{coordinate(atom.zAngstrom)}</TD>
                </TR>
              );
            })}
          </TBody>
        </Table>
        <p className="mt-2 text-xs text-ink-500">
          Coordinates as entered. Runs receive them in the standard orientation of the Abelian subgroup, with
          the centre of mass at the origin.
        </p>
      </section>

      {target.isotopologues.length > 0 ? (
        <section>
          <h2 className="mb-3 text-sm font-semibold text-ink-900">Isotopologues</h2>
          <ul className="flex flex-col gap-1 text-sm">
            {target.isotopologues.map((isotopologue) => (
              <li key={isotopologue.id}>
                <Link
                  to={paths.target(target.groupId, isotopologue.id)}
                  className="text-flux-800 hover:underline"
                >
                  {isotopologue.name}
                </Link>{" "}
                <span className="font-mono text-xs text-ink-500">
                  {isotopologue.pointGroup}, version {isotopologue.latestVersion}
                </span>
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      <section>
        <h2 className="mb-3 text-sm font-semibold text-ink-900">Versions</h2>
        <Table caption={`Versions of ${target.name}`}>
          <THead>
            <TR>
              <TH>Version</TH>
              <TH>Saved</TH>
              <TH>By</TH>
            </TR>
          </THead>
          <TBody>
            {target.versions.map((entry) => (
              <TR key={entry.id}>
                <TD className="font-mono text-xs">
                  {entry.version}
                  {entry.version === version.version ? " (current)" : ""}
                </TD>
                <TD className="text-xs">{formatDateTime(entry.createdAt)}</TD>
                <TD className="text-xs">{entry.createdByName ?? "—"}</TD>
              </TR>
            ))}
          </TBody>
        </Table>
      </section>
    </div>
  );
}
