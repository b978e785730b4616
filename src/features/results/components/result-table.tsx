import type { Result } from "@shared/schemas";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatSignificant } from "../format-number";
import { columnLabel } from "../result-labels";

/** One result's columns as a table: units in the headers, four significant digits in the cells. */
export function ResultTable({ result, caption }: { result: Result; caption: string }) {
  const columns = result.columnOrder.map((name) => ({ name, values: result.columns[name] ?? [] }));
  const rowCount = Math.max(0, ...columns.map((column) => column.values.length));
  return (
    <Table caption={caption}>
      <THead>
        <TR>
          {columns.map((column) => (
            <TH key={column.name} className="px-3 normal-case tracking-normal" title={column.name}>
              {columnLabel(column.name).text}
            </TH>
          ))}
        </TR>
      </THead>
      <TBody>
        {Array.from({ length: rowCount }, (_, row) => (
          // biome-ignore lint/suspicious/noArrayIndexKey: rows of a stored table never reorder
          <TR key={row}>
            {columns.map((column) => (
              <TD key={column.name} className="px-3 py-1 font-mono text-xs tabular-nums">
                {column.values[row] === undefined ? "" : formatSignificant(column.values[row]!)}
              </TD>
            ))}
          </TR>
        ))}
      </TBody>
    </Table>
  );
}

/**
 * Results of one value per column (an orbital table: one result per orbital) as one table, a row per
 * result named by its label and irrep.
 */
export function ResultRowsTable({ results, caption }: { results: readonly Result[]; caption: string }) {
  const names = results[0]?.columnOrder ?? [];
  return (
    <Table caption={caption}>
      <THead>
        <TR>
          <TH className="px-3 normal-case tracking-normal">Orbital</TH>
          <TH className="px-3 normal-case tracking-normal">Irrep</TH>
          {names.map((name) => (
            <TH key={name} className="px-3 normal-case tracking-normal" title={name}>
              {columnLabel(name).text}
            </TH>
          ))}
        </TR>
      </THead>
      <TBody>
        {results.map((result) => (
          <TR key={result.id}>
            <TD className="px-3 py-1 font-mono text-xs">{result.label || "—"}</TD>
            <TD className="px-3 py-1 font-mono text-xs">{result.irrep ?? "—"}</TD>
            {names.map((name) => (
              <TD key={name} className="px-3 py-1 font-mono text-xs tabular-nums">
                {(result.columns[name] ?? []).map((value) => formatSignificant(value)).join(", ")}
              </TD>
            ))}
          </TR>
        ))}
      </TBody>
    </Table>
  );
}

/** Single-valued or short-list properties (energies, dipole, rotational constants, frequencies), one per line. */
export function PropertiesTable({ results, caption }: { results: readonly Result[]; caption: string }) {
  return (
    <Table caption={caption}>
      <THead>
        <TR>
          <TH className="px-3 normal-case tracking-normal">Quantity</TH>
          <TH className="px-3 normal-case tracking-normal">Value</TH>
        </TR>
      </THead>
      <TBody>
        {results.flatMap((result) =>
          result.columnOrder.map((name) => (
            <TR key={`${result.id}/${name}`}>
              <TD className="px-3 py-1 text-sm" title={name}>
                {columnLabel(name).text}
              </TD>
              <TD className="px-3 py-1 font-mono text-xs tabular-nums">
                {(result.columns[name] ?? []).map((value) => formatSignificant(value)).join(", ")}
              </TD>
            </TR>
          )),
        )}
      </TBody>
    </Table>
  );
}
