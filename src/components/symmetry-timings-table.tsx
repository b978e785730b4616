import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";

export type SymmetryTiming = { stage: string; symmetry: string; durationSeconds: number };

/** Wall time per symmetry of each stage, as the code's output rules read it from the log. */
export function SymmetryTimingsTable({ timings }: { timings: readonly SymmetryTiming[] }) {
  return (
    <Table caption="Time per symmetry">
      <THead>
        <TR>
          <TH>Stage</TH>
          <TH>Symmetry</TH>
          <TH>Seconds</TH>
        </TR>
      </THead>
      <TBody>
        {timings.map((timing) => (
          <TR key={`${timing.stage}-${timing.symmetry}`}>
            <TD>{timing.stage}</TD>
            <TD className="font-mono">{timing.symmetry}</TD>
            <TD className="font-mono">{timing.durationSeconds.toFixed(2)}</TD>
          </TR>
        ))}
      </TBody>
    </Table>
  );
}
