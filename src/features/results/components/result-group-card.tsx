import { useMemo, useState } from "react";
import { Card, CardBody } from "@/components/ui/card";
import {
  chartPlan,
  groupMethod,
  LOG_Y_DECADES,
  partName,
  type ResultGroup,
  seriesMethods,
} from "../chart-plan";
import { formatSignificant } from "../format-number";
import { LazyResultChart } from "./lazy-result-chart";
import { PropertiesTable, ResultRowsTable, ResultTable } from "./result-table";

/** The modified-Arrhenius parameters of a rate, as reaction networks take them. */
function FitParameters({
  name,
  fit,
}: {
  name: string;
  fit: NonNullable<ResultGroup["rows"][number]["fit"]>;
}) {
  return (
    <div className="text-sm">
      <p className="text-xs text-ink-500">
        {name}: k(T) = α (T/300 K)<sup>β</sup> exp(−γ/T), fitted over {formatSignificant(fit.minTemperatureK)}
        –{formatSignificant(fit.maxTemperatureK)} K
      </p>
      <dl className="mt-1 flex flex-wrap gap-x-6 gap-y-1 font-mono text-xs">
        <div>
          <dt className="inline">α = </dt>
          <dd className="inline">{formatSignificant(fit.alpha_cm3_per_s)} cm³ s⁻¹</dd>
        </div>
        <div>
          <dt className="inline">β = </dt>
          <dd className="inline">{formatSignificant(fit.beta)}</dd>
        </div>
        <div>
          <dt className="inline">γ = </dt>
          <dd className="inline">{formatSignificant(fit.gamma_K)} K</dd>
        </div>
        <div>
          <dt className="inline">largest deviation from the computed rates: </dt>
          <dd className="inline">{formatSignificant(fit.maxRelativeDeviation * 100, 2)} %</dd>
        </div>
      </dl>
    </div>
  );
}

/**
 * A group's numbers, a table per result, behind a disclosure: the rows are put on the page only while it
 * is open (a run's results hold thousands of them).
 */
function NumbersDisclosure({ group }: { group: ResultGroup }) {
  const [open, setOpen] = useState(false);
  return (
    <details className="group" onToggle={(event) => setOpen(event.currentTarget.open)}>
      <summary className="cursor-pointer text-sm font-medium text-flux-800">
        Numbers ({group.rows.length === 1 ? "1 table" : `${group.rows.length} tables`})
      </summary>
      {open ? (
        <div className="mt-3 flex flex-col gap-4">
          {group.rows.map((row) => (
            <div key={row.id}>
              {group.rows.length > 1 ? (
                <p className="mb-1 text-xs font-medium text-ink-700">{partName(row, group)}</p>
              ) : null}
              <ResultTable result={row} caption={`${group.title}: ${partName(row, group)}`} />
            </div>
          ))}
        </div>
      ) : null}
    </details>
  );
}

/** One kind of result for one process: how it was derived, its chart, fit parameters and numbers. */
export function ResultGroupCard({ group }: { group: ResultGroup }) {
  const plan = useMemo(() => chartPlan(group), [group]);
  const method = groupMethod(group);
  const perSeries = seriesMethods(group);
  const fits = group.rows.flatMap((row) => (row.fit ? [{ row, fit: row.fit }] : []));
  const headingId = `result-${group.key.replace(/[^a-z0-9]+/gi, "-")}`;
  return (
    <Card>
      <CardBody className="flex flex-col gap-4">
        <div>
          <h3 id={headingId} className="text-sm font-semibold text-ink-900">
            {group.title}
          </h3>
          {method ? <p className="mt-1 text-xs text-ink-600">{method}</p> : null}
          {perSeries.length > 0 ? (
            <details className="mt-1">
              <summary className="cursor-pointer text-xs font-medium text-flux-800">
                Method per series
              </summary>
              <dl className="mt-1 flex flex-col gap-1 text-xs text-ink-600">
                {perSeries.map((part) => (
                  <div key={part.id}>
                    <dt className="inline font-medium text-ink-700">{part.name}: </dt>
                    <dd className="inline">{part.method}</dd>
                  </div>
                ))}
              </dl>
            </details>
          ) : null}
        </div>
        {plan ? <LazyResultChart plan={plan} /> : null}
        {plan && plan.leftOut > 0 ? (
          <p className="text-xs text-ink-600">
            {plan.leftOut} {plan.leftOut === 1 ? "value is" : "values are"} not drawn:{" "}
            {plan.logX || plan.logY
              ? "zero, negative or not finite, which a logarithmic axis cannot show"
              : "not finite"}
            . The table lists every value.
          </p>
        ) : null}
        {plan && plan.belowRange > 0 ? (
          <p className="text-xs text-ink-600">
            {plan.belowRange} {plan.belowRange === 1 ? "value lies" : "values lie"} more than {LOG_Y_DECADES}{" "}
            decades below the largest, under the chart&apos;s lower edge. The table lists every value.
          </p>
        ) : null}
        {fits.map(({ row, fit }) => (
          <FitParameters key={row.id} name={partName(row, group)} fit={fit} />
        ))}
        {group.kind === "orbital-table" ? (
          <ResultRowsTable results={group.rows} caption={group.title} />
        ) : group.kind === "target-properties" ? (
          <PropertiesTable results={group.rows} caption={group.title} />
        ) : (
          <NumbersDisclosure group={group} />
        )}
      </CardBody>
    </Card>
  );
}
