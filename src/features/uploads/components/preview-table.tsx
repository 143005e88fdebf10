import { useMemo } from "react";
import { createColumnHelper, tableFeatures, useTable } from "@tanstack/react-table";

const features = tableFeatures({});
type PreviewRow = { line: number; cells: string[] };
const h = createColumnHelper<typeof features, PreviewRow>();

/** The first data rows of a file as read with the chosen dialect, with their file line numbers. */
export function PreviewTable({ header, rows, lines, caption }: { header: string[] | null; rows: string[][]; lines: number[]; caption: string }) {
  const width = Math.max(header?.length ?? 0, ...rows.map((r) => r.length));
  const columns = useMemo(
    () =>
      h.columns([
        h.accessor("line", { header: "Line", cell: (c) => c.getValue() }),
        ...Array.from({ length: width }, (_, i) =>
          h.accessor((r) => r.cells[i] ?? "", { id: `c${i}`, header: () => (header?.[i] ? header[i] : `Column ${i + 1}`), cell: (c) => c.getValue() }),
        ),
      ]),
    [header, width],
  );
  const data = useMemo(() => rows.map((cells, k) => ({ line: lines[k] ?? k + 1, cells })), [rows, lines]);
  const table = useTable({ features, columns, data });
  return (
    <div className="max-h-[28rem] overflow-auto rounded-lg border border-line bg-surface" data-testid="preview-table">
      <table className="w-full border-collapse text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead className="sticky top-0">
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id}>
              {g.headers.map((hd) => (
                <th key={hd.id} scope="col" className="whitespace-nowrap border-b border-line bg-sunken px-2.5 py-1.5 text-left font-semibold text-muted first:text-right">
                  <table.FlexRender header={hd} />
                </th>
              ))}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((r) => (
            <tr key={r.id} className="hover:bg-sunken/60">
              {r.getAllCells().map((c, i) => (
                <td key={c.id} className={i === 0 ? "num border-b border-line/60 px-2.5 py-1 text-right text-muted" : "num whitespace-nowrap border-b border-line/60 px-2.5 py-1"}>
                  <table.FlexRender cell={c} />
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
