import { linearGrid, logGrid } from "@shared/science/grids";
import { useId, useState } from "react";
import { Button } from "@/components/ui/button";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";

type Spacing = "linear" | "log";

/** 4 significant figures: what a person reads in the list; the grid itself keeps full precision. */
const short = (energyEv: number) => Number(energyEv.toPrecision(4)).toString();

/** The grid a builder describes, or why it cannot be built (shared/science/grids checks the bounds). */
export function gridFrom(
  startEv: number,
  endEv: number,
  points: number,
  spacing: Spacing,
): { energiesEv: number[] } | { error: string } {
  if (![startEv, endEv, points].every(Number.isFinite)) return { error: "Give start, end and points." };
  if (!Number.isInteger(points) || points < 2)
    return { error: "Points must be a whole number of at least 2." };
  try {
    return {
      energiesEv:
        spacing === "log" ? logGrid(startEv, endEv, points) : linearGrid(startEv, endEv, { count: points }),
    };
  } catch (error) {
    return { error: (error as Error).message };
  }
}

/** The points on a log axis: where a grid is dense and where sparse, at a glance. */
function GridStrip({ energiesEv }: { energiesEv: number[] }) {
  const first = energiesEv[0];
  const last = energiesEv[energiesEv.length - 1];
  if (first === undefined || last === undefined || first <= 0) return null;
  const span = Math.log(last / first) || 1;
  return (
    <svg
      viewBox="0 0 400 24"
      className="h-6 w-full"
      role="img"
      aria-label="Grid points on a logarithmic axis"
    >
      <line x1="0" x2="400" y1="12" y2="12" className="stroke-ink-200" strokeWidth="1" />
      {energiesEv.map((energyEv, i) => (
        <line
          // biome-ignore lint/suspicious/noArrayIndexKey: the points are fixed for one rendering
          key={i}
          x1={(Math.log(energyEv / first) / span) * 396 + 2}
          x2={(Math.log(energyEv / first) / span) * 396 + 2}
          y1="5"
          y2="19"
          className="stroke-flux-700"
          strokeWidth="1"
        />
      ))}
    </svg>
  );
}

type Props = {
  label: string;
  /** The energies the parameter holds now, eV. */
  value: number[];
  maxItems?: number;
  onFill: (energiesEv: number[]) => void;
  describedBy?: string;
};

/**
 * Builds a collision-energy grid (start, end, points, linear or logarithmic spacing, all in eV) and fills
 * the parameter with it; the preview lists the points before they are used.
 */
export function EnergyGridBuilder({ label, value, maxItems, onFill, describedBy }: Props) {
  const id = useId();
  const [startEv, setStartEv] = useState(String(value[0] ?? 0.1));
  const [endEv, setEndEv] = useState(String(value[value.length - 1] ?? 50));
  const [points, setPoints] = useState(String(value.length || 40));
  const [spacing, setSpacing] = useState<Spacing>("log");
  const built = gridFrom(Number(startEv), Number(endEv), Number(points), spacing);
  const tooMany = "energiesEv" in built && maxItems !== undefined && built.energiesEv.length > maxItems;
  const problem = "error" in built ? built.error : tooMany ? `At most ${maxItems} points.` : null;
  return (
    <fieldset className="rounded-lg border border-ink-200 p-3" aria-describedby={describedBy}>
      <legend className="px-1 text-sm font-medium text-ink-800">{label}: energy grid</legend>
      <div className="grid grid-cols-2 gap-2 sm:grid-cols-4">
        <label className="text-xs text-ink-600" htmlFor={`${id}-start`}>
          Start (eV)
          <Input
            id={`${id}-start`}
            inputMode="decimal"
            value={startEv}
            onChange={(e) => setStartEv(e.target.value)}
          />
        </label>
        <label className="text-xs text-ink-600" htmlFor={`${id}-end`}>
          End (eV)
          <Input
            id={`${id}-end`}
            inputMode="decimal"
            value={endEv}
            onChange={(e) => setEndEv(e.target.value)}
          />
        </label>
        <label className="text-xs text-ink-600" htmlFor={`${id}-points`}>
          Points
          <Input
            id={`${id}-points`}
            inputMode="numeric"
            value={points}
            onChange={(e) => setPoints(e.target.value)}
          />
        </label>
        <label className="text-xs text-ink-600" htmlFor={`${id}-spacing`}>
          Spacing
          <Select
            id={`${id}-spacing`}
            value={spacing}
            onChange={(e) => setSpacing(e.target.value as Spacing)}
          >
            <option value="log">logarithmic</option>
            <option value="linear">linear</option>
          </Select>
        </label>
      </div>
      {problem ? (
        <p className="mt-2 text-sm text-ember-700" role="alert">
          {problem}
        </p>
      ) : "energiesEv" in built ? (
        <div className="mt-2 space-y-1">
          <GridStrip energiesEv={built.energiesEv} />
          <p className="text-xs text-ink-600">
            {built.energiesEv.length} points (eV): {built.energiesEv.slice(0, 12).map(short).join(", ")}
            {built.energiesEv.length > 12
              ? ` … ${short(built.energiesEv[built.energiesEv.length - 1]!)}`
              : ""}
          </p>
          <Button size="sm" variant="secondary" onClick={() => onFill(built.energiesEv)}>
            Use these {built.energiesEv.length} energies
          </Button>
        </div>
      ) : null}
      <p className="mt-2 text-xs text-ink-500">
        In use:{" "}
        {value.length === 0
          ? "none (the code's default applies)"
          : `${value.length} energies, ${short(value[0]!)}–${short(value[value.length - 1]!)} eV`}
      </p>
    </fieldset>
  );
}
