import type { BasisCoverageReport } from "@shared/science/basis-coverage";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { Formula } from "@/lib/formula";
import type { DerivedTarget } from "../lib/derive-target";
import { formatCoordinate } from "../lib/target-draft";
import { ChargeChart } from "./charge-chart";

const ROTOR_WORDS = {
  atom: "atom (no rotation)",
  linear: "linear",
  spherical: "spherical top",
  prolate: "prolate symmetric top",
  oblate: "oblate symmetric top",
  asymmetric: "asymmetric top",
} as const;

const sig = (value: number | null) => (value === null ? "—" : String(Number(value.toPrecision(6))));
const triple = (values: readonly (number | null)[]) => values.map(sig).join(", ");

function Row({ label, children, wide }: { label: string; children: React.ReactNode; wide?: boolean }) {
  return (
    <div className={wide ? "flex min-w-0 flex-col gap-0.5 sm:col-span-2" : "flex min-w-0 flex-col gap-0.5"}>
      <dt className="text-xs text-ink-500">{label}</dt>
      <dd className="font-mono text-sm break-words text-ink-900 tabular-nums">{children}</dd>
    </div>
  );
}

/** One plain warning per element the basis does not (or may not) define, naming the atoms. */
function coverageWarnings(report: BasisCoverageReport): string[] {
  const byElement = (atoms: BasisCoverageReport["uncovered"]) => {
    const groups = new Map<string, number[]>();
    for (const atom of atoms) groups.set(atom.symbol, [...(groups.get(atom.symbol) ?? []), atom.index]);
    return [...groups];
  };
  const atomsWord = (indices: number[]) => `atom${indices.length > 1 ? "s" : ""} ${indices.join(", ")}`;
  return [
    ...byElement(report.uncovered).map(
      ([symbol, indices]) =>
        `${report.basis} does not define ${symbol} (${atomsWord(indices)}): choose another basis for it.`,
    ),
    ...byElement(report.uncertain).map(
      ([symbol, indices]) =>
        `${report.basis} may not define ${symbol} (${atomsWord(indices)}): check the basis before a run.`,
    ),
  ];
}

type DerivedPanelProps = {
  derived: DerivedTarget;
  /** True while the atoms typed have a field error: the panel shows the last atoms that were valid. */
  stale: boolean;
  basis: string;
  basisNames: string[];
  onBasisChange: (basis: string) => void;
  diffuseExponent: string;
  onDiffuseExponentChange: (value: string) => void;
  onRecentre: () => void;
};

/** What the science core derives from the atoms as typed, recomputed on every change. */
export function DerivedPanel(props: DerivedPanelProps) {
  const { derived, stale } = props;
  const inspection = derived.inspection;
  const com = inspection?.centreOfMassAngstrom;
  const offCentre = com ? Math.hypot(...com) > 5e-7 : false;
  return (
    <section aria-labelledby="derived-heading" aria-live="polite" className="flex flex-col gap-4">
      <h3 id="derived-heading" className="text-sm font-semibold text-ink-900">
        Derived as you type
      </h3>
      {stale ? (
        <p className="text-xs text-ember-700">Fix the marked fields; shown: the atoms as last valid.</p>
      ) : null}
      {derived.problem ? <Notice tone="warning">{derived.problem}</Notice> : null}
      {inspection ? (
        <dl className="grid gap-x-6 gap-y-3 sm:grid-cols-2" aria-label="Derived properties">
          <Row label="Point group / Abelian subgroup">
            {inspection.pointGroup} / {inspection.abelianSubgroup}
          </Row>
          <Row label="Formula, mass (u)">
            <Formula formula={inspection.formula} />, {sig(inspection.totalMassU)}
          </Row>
          <Row label="Centre of mass (Å)">
            <span className="block">{inspection.centreOfMassAngstrom.map(formatCoordinate).join(", ")}</span>
            {offCentre ? (
              <Button variant="secondary" size="sm" className="mt-1.5" onClick={props.onRecentre}>
                Recentre
              </Button>
            ) : null}
          </Row>
          <Row label="Rotor type">{ROTOR_WORDS[inspection.rotorType]}</Row>
          <Row label="Rotational constants A, B, C (cm⁻¹)">{triple(inspection.rotationalConstantsCm1)}</Row>
          <Row label="Rotational constants A, B, C (MHz)">{triple(inspection.rotationalConstantsMHz)}</Row>
          <Row label="Nuclear repulsion (Eₕ)">{sig(inspection.nuclearRepulsionHartree)}</Row>
          <Row label="Electrons, spin" wide>
            <span className={derived.spin?.ok ? "text-ink-900" : "text-ember-700"}>
              {derived.spin?.message}
            </span>
          </Row>
        </dl>
      ) : null}
      <div className="grid gap-3 sm:grid-cols-[minmax(0,20rem)_minmax(0,14rem)]">
        <label className="flex flex-col gap-1 text-sm font-medium text-ink-800">
          Basis set for the coverage check
          <select
            value={props.basis}
            onChange={(event) => props.onBasisChange(event.target.value)}
            className="h-8 rounded-lg border border-ink-200 bg-white px-2 font-mono text-xs"
          >
            {props.basisNames.map((name) => (
              <option key={name}>{name}</option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium text-ink-800">
          Most diffuse exponent α (bohr⁻²)
          <input
            value={props.diffuseExponent}
            inputMode="decimal"
            onChange={(event) => props.onDiffuseExponentChange(event.target.value)}
            className="h-8 rounded-lg border border-ink-200 bg-white px-2 font-mono text-xs"
          />
        </label>
      </div>
      {derived.coverage ? (
        derived.coverage.covered && derived.coverage.uncertain.length === 0 ? (
          <p className="text-sm text-ink-700">
            {derived.coverage.basis} defines every element of this target.
          </p>
        ) : (
          <ul className="flex flex-col gap-1" aria-label="Basis coverage warnings">
            {coverageWarnings(derived.coverage).map((warning) => (
              <li key={warning} className="text-sm text-ember-700">
                {warning}
              </li>
            ))}
          </ul>
        )
      ) : null}
      {derived.chargeCurve ? (
        <figure className="flex flex-col gap-1">
          <ChargeChart curve={derived.chargeCurve} />
          <figcaption className="text-xs text-ink-600">
            Charge within a sphere about the centre of mass: nuclei (solid) and electrons (dashed; each atom's
            electrons spread like one s function of exponent α, so the curve errs towards larger radii).
            {derived.chargeCurve.suggestedRadiusBohr !== null
              ? ` All nuclei and all but ${derived.chargeCurve.tolerance * 100} % of the electrons lie within ${derived.chargeCurve.suggestedRadiusBohr.toFixed(2)} bohr.`
              : ""}
          </figcaption>
        </figure>
      ) : null}
    </section>
  );
}
