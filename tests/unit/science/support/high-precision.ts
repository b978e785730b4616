/**
 * Arbitrary-precision reference values from ./high-precision.py (mpmath at 400 digits, Debian's
 * python3-mpmath), for tests at inputs where double-precision evaluation of a textbook formula breaks down.
 */
import { fileURLToPath } from "node:url";
import { runPythonJson } from "./python-json";

const SCRIPT = fileURLToPath(new URL("./high-precision.py", import.meta.url));

export interface DipoleBornCase {
  dipoleDebye: number;
  rotationalConstantCm1: number;
  j: number;
  jFinal: number;
  kProjection?: number;
  energyEv: number;
}

export interface BebCase {
  bindingEv: number;
  kineticEv: number;
  occupation: number;
  energyEv: number;
}

function evaluate(formula: string, cases: readonly object[]): number[] {
  const output = runPythonJson(
    SCRIPT,
    { formula, cases },
    { installHint: "Install mpmath with: apt-get install -y --no-install-recommends python3-mpmath" },
  ) as { results: string[] };
  return output.results.map(Number);
}

/** σ(J → J') in Å², evaluated as written in Itikawa & Mason (2005) with CODATA 2018 constants. */
export function dipoleBornReferenceA2(cases: readonly DipoleBornCase[]): number[] {
  return evaluate("dipole-born", cases);
}

/** BEB σ in Å², evaluated as written in Kim & Rudd (1994) with CODATA 2018 constants. */
export function bebReferenceA2(cases: readonly BebCase[]): number[] {
  return evaluate("beb", cases);
}
