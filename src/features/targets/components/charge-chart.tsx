import type { EnclosedChargeCurve } from "../lib/enclosed-charge";

const WIDTH = 420;
const HEIGHT = 200;
const PAD = { left: 40, right: 12, top: 10, bottom: 30 };

/**
 * Enclosed nuclear and electronic charge (e) against the sphere radius (bohr) as a small SVG: two lines, a
 * mark at the suggested radius, axes with units. The numbers are in the table beside it for screen readers.
 */
export function ChargeChart({ curve }: { curve: EnclosedChargeCurve }) {
  const maxR = curve.points.at(-1)?.radiusBohr ?? 1;
  const maxQ = Math.max(curve.totalNuclearE, curve.totalElectrons, 1);
  const x = (r: number) => PAD.left + ((WIDTH - PAD.left - PAD.right) * r) / maxR;
  const y = (q: number) => HEIGHT - PAD.bottom - ((HEIGHT - PAD.top - PAD.bottom) * q) / maxQ;
  const line = (pick: (p: EnclosedChargeCurve["points"][number]) => number) =>
    curve.points
      .map((p, i) => `${i === 0 ? "M" : "L"}${x(p.radiusBohr).toFixed(1)},${y(pick(p)).toFixed(1)}`)
      .join("");
  const ticks = [0, 0.25, 0.5, 0.75, 1].map((f) => f * maxR);
  return (
    <svg
      viewBox={`0 0 ${WIDTH} ${HEIGHT}`}
      className="w-full max-w-md"
      role="img"
      aria-label={`Enclosed charge against radius: all ${curve.totalNuclearE} e of nuclear charge within ${
        curve.points.find((p) => p.nuclearE === curve.totalNuclearE)?.radiusBohr.toFixed(2) ?? "—"
      } bohr${curve.suggestedRadiusBohr === null ? "" : `, electrons enclosed to ${curve.tolerance} at ${curve.suggestedRadiusBohr.toFixed(2)} bohr`}`}
    >
      <line
        x1={PAD.left}
        y1={HEIGHT - PAD.bottom}
        x2={WIDTH - PAD.right}
        y2={HEIGHT - PAD.bottom}
        className="stroke-ink-300"
      />
      <line x1={PAD.left} y1={PAD.top} x2={PAD.left} y2={HEIGHT - PAD.bottom} className="stroke-ink-300" />
      {ticks.map((r) => (
        <text
          key={r}
          x={x(r)}
          y={HEIGHT - PAD.bottom + 12}
          textAnchor="middle"
          className="fill-ink-500 text-[9px]"
        >
          {r.toFixed(1)}
        </text>
      ))}
      <text
        x={(WIDTH + PAD.left) / 2}
        y={HEIGHT - 4}
        textAnchor="middle"
        className="fill-ink-600 text-[10px]"
      >
        radius (bohr)
      </text>
      <text x={PAD.left - 4} y={y(maxQ) + 3} textAnchor="end" className="fill-ink-500 text-[9px]">
        {maxQ}
      </text>
      <text x={PAD.left - 4} y={y(0) + 3} textAnchor="end" className="fill-ink-500 text-[9px]">
        0
      </text>
      <text
        x={12}
        y={(HEIGHT - PAD.bottom) / 2}
        transform={`rotate(-90 12 ${(HEIGHT - PAD.bottom) / 2})`}
        textAnchor="middle"
        className="fill-ink-600 text-[10px]"
      >
        charge (e)
      </text>
      <path d={line((p) => p.nuclearE)} fill="none" className="stroke-ink-800" strokeWidth={1.5} />
      <path
        d={line((p) => p.electronicE)}
        fill="none"
        className="stroke-flux-600"
        strokeWidth={1.5}
        strokeDasharray="4 2"
      />
      {curve.suggestedRadiusBohr !== null ? (
        <line
          x1={x(curve.suggestedRadiusBohr)}
          x2={x(curve.suggestedRadiusBohr)}
          y1={PAD.top}
          y2={HEIGHT - PAD.bottom}
          className="stroke-ember-600"
          strokeDasharray="2 2"
        />
      ) : null}
    </svg>
  );
}
