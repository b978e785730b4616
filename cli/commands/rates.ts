/**
 * `sigmaflow rates maxwellian`: Maxwellian rate coefficients of a tabulated cross section, with an
 * optional modified-Arrhenius fit.
 */
import { tailExtrapolationSchema } from "../../shared/schemas/science-rates";
import { fitModifiedArrhenius } from "../../shared/science/rates/arrhenius-fit";
import { maxwellianRateCoefficients } from "../../shared/science/rates/maxwellian-rate";
import { CliError } from "../errors";
import { assertFiniteResult } from "../lib/finite-output";
import {
  formatNumber,
  formatTable,
  numericColumns,
  parseCsv,
  parseNumberList,
  parseOptions,
  readTextFile,
  requireOption,
  withScienceErrors,
} from "../lib/input-files";

const USAGE = `Usage: sigmaflow rates maxwellian --cross-section FILE.csv --temperatures-k LIST
                                [--tail zero|constant|inverse-energy] [--fit-arrhenius [--refine]] [--json]

Maxwellian rate coefficients k(T) = sqrt(8/(π m_e)) (kT)^(-3/2) ∫ σ(E) E exp(-E/kT) dE, σ linear between points.

  --cross-section FILE.csv  CSV with the header energyEv,crossSectionA2 (energies increasing); σ = 0 below
                            the first energy
  --temperatures-k LIST     electron temperatures in K: 300,1000 or ranges start:stop:count[:log]
  --tail MODE               σ above the last energy: zero (default), constant, inverse-energy (σ ∝ 1/E)
  --fit-arrhenius           fit k = alpha (T/300)^beta exp(-gamma/T) (alpha cm³/s, gamma K)
  --refine                  refine the Arrhenius fit by Levenberg–Marquardt on relative residuals
  --json                    print one JSON document {temperaturesK, rateCm3PerS, tail,
                            maxwellianFractionBeyondTable, arrhenius?}
`;

/** Population fraction above the table end beyond which a warning is printed. */
const WARN_FRACTION = 1e-3;

/**
 * Entry point of `sigmaflow rates ...`.
 *
 * @param args - arguments after the group name (subcommand first)
 * @returns the exit code (0 success, 2 usage error); user errors are thrown as CliError
 */
export async function run(args: string[]): Promise<number> {
  const [command, ...rest] = args;
  if (command === undefined || command === "--help" || command === "-h" || command === "help") {
    process.stdout.write(USAGE);
    return command === undefined ? 2 : 0;
  }
  if (command !== "maxwellian") throw new CliError(`unknown command "${command}".\n\n${USAGE}`);
  const options = parseOptions(rest, {
    "cross-section": { type: "string" },
    "temperatures-k": { type: "string" },
    tail: { type: "string", default: "zero" },
    "fit-arrhenius": { type: "boolean", default: false },
    refine: { type: "boolean", default: false },
    json: { type: "boolean", default: false },
    help: { type: "boolean", short: "h", default: false },
  });
  if (options.help) {
    process.stdout.write(USAGE);
    return 0;
  }
  const tail = tailExtrapolationSchema.safeParse(options.tail);
  if (!tail.success)
    throw new CliError(`--tail must be zero, constant or inverse-energy; got "${options.tail}".`);
  const path = requireOption(options["cross-section"], "--cross-section");
  const what = "cross-section file";
  const columns = numericColumns(
    parseCsv(readTextFile(path, what), what),
    ["energyEv", "crossSectionA2"],
    what,
  );
  const temperaturesK = parseNumberList(
    requireOption(options["temperatures-k"], "--temperatures-k"),
    "--temperatures-k",
  );
  const rates = withScienceErrors(() =>
    maxwellianRateCoefficients({
      table: { energiesEv: columns.energyEv, crossSectionsA2: columns.crossSectionA2 },
      temperaturesK,
      tail: tail.data,
    }),
  );
  const arrhenius = options["fit-arrhenius"]
    ? withScienceErrors(() =>
        fitModifiedArrhenius(rates.temperaturesK, rates.rateCm3PerS, { refine: options.refine }),
      )
    : undefined;

  rates.maxwellianFractionBeyondTable.forEach((fraction, i) => {
    if (fraction > WARN_FRACTION) {
      process.stderr.write(
        `warning: at ${rates.temperaturesK[i]} K, ${(fraction * 100).toPrecision(3)}% of the Maxwellian lies above ` +
          `the last tabulated energy (tail: ${rates.tail}).\n`,
      );
    }
  });

  const document = {
    temperaturesK: Array.from(rates.temperaturesK),
    rateCm3PerS: Array.from(rates.rateCm3PerS),
    tail: rates.tail,
    maxwellianFractionBeyondTable: Array.from(rates.maxwellianFractionBeyondTable),
    ...(arrhenius ? { arrhenius } : {}),
  };
  assertFiniteResult(document, "Maxwellian rate coefficients");
  if (options.json) {
    process.stdout.write(`${JSON.stringify(document)}\n`);
    return 0;
  }
  const rows = Array.from(rates.temperaturesK, (t, i) => [
    formatNumber(t),
    formatNumber(rates.rateCm3PerS[i]!),
    formatNumber(rates.maxwellianFractionBeyondTable[i]!),
  ]);
  let text = formatTable(["T (K)", "k (cm³/s)", "fraction beyond table"], rows);
  if (arrhenius) {
    text +=
      `\nModified Arrhenius fit k = alpha (T/300)^beta exp(-gamma/T)${arrhenius.refined ? " (refined)" : ""}:\n` +
      `  alpha = ${formatNumber(arrhenius.alpha)} cm³/s, beta = ${formatNumber(arrhenius.beta)}, ` +
      `gamma = ${formatNumber(arrhenius.gamma)} K, rms relative residual ${formatNumber(arrhenius.rmsRelativeResidual)}\n`;
  }
  process.stdout.write(text);
  return 0;
}
