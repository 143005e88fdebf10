import type { ReactNode } from "react";
import { FlagBadge, type QcFlag } from "./flag-badge";
import { Table, Td, Th, Tr } from "./table";

export interface FlagCountsRow {
  key: string;
  /** The leading cells (variable name, unit, …), one per `lead` heading. */
  cells: ReactNode[];
  /** How many values carry each flag. */
  counts: Partial<Record<number, number>>;
}

/** Values per QC flag and variable: leading columns, then one column per flag headed by its badge. */
export function FlagCountsTable({ caption, flags, lead = ["Variable"], rows }: { caption: string; flags: readonly QcFlag[]; lead?: string[]; rows: FlagCountsRow[] }) {
  return (
    <Table caption={caption}>
      <thead>
        <tr>
          {lead.map((h) => (
            <Th key={h}>{h}</Th>
          ))}
          {flags.map((f) => (
            <Th key={f} numeric>
              <FlagBadge flag={f} />
            </Th>
          ))}
        </tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <Tr key={r.key}>
            {r.cells.map((c, i) => (
              <Td key={i}>{c}</Td>
            ))}
            {flags.map((f) => {
              const n = r.counts[f] ?? 0;
              return (
                <Td key={f} numeric className={f >= 3 && n > 0 ? "font-semibold" : undefined}>
                  {n.toLocaleString("en-GB")}
                </Td>
              );
            })}
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}
