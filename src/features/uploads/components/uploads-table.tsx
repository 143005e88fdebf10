import { Link } from "react-router-dom";
import type { UploadSummary } from "@shared/schemas/uploads";
import { paths } from "@/config/paths";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";
import { formatBytes } from "./format";

const statusWords: Record<NonNullable<UploadSummary["status"]>, { glyph: string; word: string }> = {
  checking: { glyph: "◌", word: "checking" },
  ok: { glyph: "●", word: "readable" },
  warnings: { glyph: "△", word: "readable, with warnings" },
  unusable: { glyph: "▲", word: "cannot be processed" },
};

/** Uploads of a dataset: name, size, SHA-256, who, when (UTC), what the server found, and a way to map it. */
export function UploadsTable({ items, datasetId, canMap }: { items: UploadSummary[]; datasetId: string; canMap: boolean }) {
  return (
    <Table caption="Uploads of this dataset" className="[&_table]:min-w-[48rem]">
      <thead>
        <tr>
          <Th>File</Th>
          <Th numeric>Size</Th>
          <Th>SHA-256</Th>
          <Th>Uploaded by</Th>
          <Th>Uploaded (UTC)</Th>
          <Th>Server check</Th>
          {canMap ? <Th>
            <span className="sr-only">Actions</span>
          </Th> : null}
        </tr>
      </thead>
      <tbody>
        {items.map((u) => {
          const s = u.status ? statusWords[u.status] : null;
          return (
            <Tr key={u.id}>
              <Td className="max-w-[16rem] break-words">{u.originalName}</Td>
              <Td numeric>{formatBytes(u.sizeBytes)}</Td>
              <Td>
                <code className="num text-xs" title={u.sha256}>
                  {u.sha256.slice(0, 12)}…
                </code>
                <span className="sr-only">{u.sha256}</span>
              </Td>
              <Td>{u.uploaderName ?? "—"}</Td>
              <Td>
                <UtcTime iso={u.createdAt} />
              </Td>
              <Td className="whitespace-nowrap">
                {s ? (
                  <span>
                    <span aria-hidden className="mr-1">{s.glyph}</span>
                    {s.word}
                  </span>
                ) : (
                  "—"
                )}
              </Td>
              {canMap ? (
                <Td className="whitespace-nowrap text-right">
                  <Link to={paths.uploadMap(datasetId, u.id)}>Map and process</Link>
                </Td>
              ) : null}
            </Tr>
          );
        })}
      </tbody>
    </Table>
  );
}
