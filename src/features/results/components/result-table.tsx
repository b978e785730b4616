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
