import type { Release } from "@shared/schemas/curation";
import { formatUtc } from "@/lib/format";
import { Table, Td, Th, Tr } from "@/components/ui/table";

const size = (b: number) => (b >= 1e6 ? `${(b / 1e6).toFixed(1)} MB` : b >= 1e3 ? `${(b / 1e3).toFixed(1)} kB` : `${b} B`);

/** The citation as text a reader can copy. */
export function Citation({ release }: { release: Release }) {
  return (
    <figure className="rounded-md border border-line bg-sunken px-4 py-3">
      <figcaption className="mb-1 text-sm font-semibold text-muted">Cite as</figcaption>
      <blockquote className="select-all text-[0.95rem]" data-testid="citation">
        {release.citation}
      </blockquote>
    </figure>
  );
}

/** Every file offered for this release with its SHA-256, so anyone can check what they downloaded. */
export function ReleaseFiles({ release }: { release: Release }) {
  if (!release.files.length) {
    return <p className="text-muted">The download files of this release are being prepared; their checksums appear here once written.</p>;
  }
  return (
    <Table caption="Files and their SHA-256 checksums">
      <thead>
        <tr>
          <Th>File</Th>
          <Th>Format</Th>
          <Th numeric>Size</Th>
          <Th>SHA-256</Th>
        </tr>
      </thead>
      <tbody>
        {release.files.map((f) => (
          <Tr key={f.name}>
            <Td className="font-mono text-sm">{f.name}</Td>
            <Td>{f.format}</Td>
            <Td numeric>{size(f.sizeBytes)}</Td>
            <Td className="break-all font-mono text-xs">{f.sha256}</Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}

export function ReleaseFacts({ release }: { release: Release }) {
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-2 text-[0.95rem]">
      <dt className="text-muted">Release</dt>
      <dd className="num">{release.releaseNumber}</dd>
      <dt className="text-muted">Version</dt>
      <dd className="num">v{release.versionNumber}</dd>
      <dt className="text-muted">Released</dt>
      <dd className="num">{formatUtc(release.releasedAt)}</dd>
      <dt className="text-muted">Released by</dt>
      <dd>{release.releasedByName ?? "—"}</dd>
      <dt className="text-muted">Licence</dt>
      <dd>{release.licence}</dd>
      <dt className="text-muted">Authors</dt>
      <dd>{release.authors.join("; ")}</dd>
      <dt className="text-muted">Stable URL</dt>
      <dd className="break-all font-mono text-sm">{release.stableUrl}</dd>
    </dl>
  );
}
