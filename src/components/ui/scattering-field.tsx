import { cn } from "@/lib/cn";

/**
 * A fan of classical trajectories deflected by a repulsive 1/r² force, drawn as background art.
 * Integrated once with velocity Verlet in dimensionless units (unit speed, unit force constant);
 * small impact parameters bend sharply, large ones barely at all.
 */
type Point = { x: number; y: number };

const FORCE_CONSTANT = 0.35;
const TIME_STEP = 0.02;
const STEPS = 900;
const START_X = -9;
const IMPACT_PARAMETERS = [
  -3.2, -2.4, -1.7, -1.15, -0.75, -0.45, -0.22, 0.22, 0.45, 0.75, 1.15, 1.7, 2.4, 3.2,
];

function acceleration(p: Point): Point {
  const r2 = p.x * p.x + p.y * p.y;
  const r = Math.sqrt(r2);
  const scale = FORCE_CONSTANT / (r2 * r);
  return { x: p.x * scale, y: p.y * scale };
}

function trajectory(impactParameter: number): Point[] {
  let position = { x: START_X, y: impactParameter };
  let velocity = { x: 1, y: 0 };
  let accel = acceleration(position);
  const points: Point[] = [position];
  for (let step = 0; step < STEPS; step += 1) {
    position = {
      x: position.x + velocity.x * TIME_STEP + 0.5 * accel.x * TIME_STEP * TIME_STEP,
      y: position.y + velocity.y * TIME_STEP + 0.5 * accel.y * TIME_STEP * TIME_STEP,
    };
    const next = acceleration(position);
    velocity = {
      x: velocity.x + 0.5 * (accel.x + next.x) * TIME_STEP,
      y: velocity.y + 0.5 * (accel.y + next.y) * TIME_STEP,
    };
    accel = next;
    if (step % 6 === 0) points.push(position);
    if (Math.abs(position.x) > 10 || Math.abs(position.y) > 7) break;
  }
  return points;
}

function toPath(points: Point[]): string {
  return points.map((p, index) => `${index === 0 ? "M" : "L"}${p.x.toFixed(3)} ${p.y.toFixed(3)}`).join(" ");
}

const PATHS = IMPACT_PARAMETERS.map((b) => ({ b, d: toPath(trajectory(b)) }));

export function ScatteringField({ className }: { className?: string }) {
  return (
    <svg
      viewBox="-9 -6 18 12"
      preserveAspectRatio="xMidYMid slice"
      aria-hidden="true"
      className={cn(className)}
    >
      <defs>
        <radialGradient id="sf-target-glow">
          <stop offset="0%" stopColor="#38c7ac" stopOpacity="0.55" />
          <stop offset="100%" stopColor="#38c7ac" stopOpacity="0" />
        </radialGradient>
      </defs>
      {[0.9, 1.8, 2.7].map((radius) => (
        <circle
          key={radius}
          r={radius}
          fill="none"
          stroke="#6a84b5"
          strokeOpacity={0.25}
          strokeWidth={0.015}
          strokeDasharray="0.06 0.12"
        />
      ))}
      {PATHS.map(({ b, d }) => (
        <path
          key={b}
          d={d}
          fill="none"
          stroke={Math.abs(b - 0.45) < 1e-9 ? "#38c7ac" : "#9aaed1"}
          strokeOpacity={Math.abs(b - 0.45) < 1e-9 ? 0.95 : 0.22 + 0.5 / (1 + Math.abs(b))}
          strokeWidth={Math.abs(b - 0.45) < 1e-9 ? 0.045 : 0.02}
          strokeLinecap="round"
        />
      ))}
      <circle r={0.9} fill="url(#sf-target-glow)" />
      <circle r={0.16} fill="#38c7ac" />
    </svg>
  );
}
