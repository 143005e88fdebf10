import { useMemo, useState } from "react";
import type { DatasetLanding } from "@shared/schemas/catalogue";
import type { Release } from "@shared/schemas/curation";
import { utcInputToIso } from "@/lib/format";
import { getErrorMessage } from "@/lib/api-client";
import { Alert } from "@/components/ui/alert";
import { Button, buttonClass } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { CopyButton } from "@/features/catalogue/components/copy-button";
import { useVerifyRelease } from "../api/verify-release";

const formats = [
  { value: "csv", label: "CSV (spreadsheets, any tool)" },
  { value: "datapackage", label: "Data Package zip (CSV + datapackage.json + README)" },
  { value: "parquet", label: "Parquet (pandas, R arrow, DuckDB)" },
];
const qcLevels = [
  { value: "all", label: "All values, with their flags" },
  { value: "pass_suspect", label: "Pass and suspect (drop failed values)" },
  { value: "pass", label: "Only pass" },
];

const mb = (n: number) => (n >= 1e6 ? `${(n / 1e6).toFixed(1)} MB` : `${(n / 1e3).toFixed(1)} kB`);

/** A download link for the whole version or a subset: time range, variables, QC level and decimation. */
export function DownloadForm({ l }: { l: DatasetLanding }) {
  const [format, setFormat] = useState("csv");
  const [from, setFrom] = useState("");
  const [to, setTo] = useState("");
  const [qc, setQc] = useState("all");
  const [every, setEvery] = useState("1");
  const [vars, setVars] = useState<string[]>([]);
  const versionId = l.version!.id;
  const query = useMemo(() => {
    const s = new URLSearchParams({ format });
    if (from.trim()) s.set("from", utcInputToIso(from));
    if (to.trim()) s.set("to", utcInputToIso(to));
    if (vars.length) s.set("variables", vars.join(","));
    if (qc !== "all") s.set("qc", qc);
    if (every.trim() && every.trim() !== "1") s.set("every", every.trim());
    return s.toString();
  }, [format, from, to, vars, qc, every]);
  const href = `/api/v1/versions/${versionId}/download?${query}`;
  return (
    <form className="space-y-3" aria-label="Download this version" onSubmit={(e) => e.preventDefault()}>
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField label="Format" value={format} onChange={(e) => setFormat(e.target.value)} options={formats} />
        <SelectField label="QC level" value={qc} onChange={(e) => setQc(e.target.value)} options={qcLevels} hint="Values below the level are left empty; their flag stays." />
        <TextField label="From (UTC, inclusive)" placeholder="2026-03-01 00:00" value={from} onChange={(e) => setFrom(e.target.value)} />
        <TextField label="To (UTC, exclusive)" placeholder="2026-04-01 00:00" value={to} onChange={(e) => setTo(e.target.value)} />
        <TextField label="Keep every n-th record" inputMode="numeric" inputClassName="num text-right" value={every} onChange={(e) => setEvery(e.target.value)} hint="1 keeps all records." />
        <div className="flex flex-col gap-1">
          <label htmlFor="download-variables" className="text-sm font-semibold">
            Variables (none chosen = all)
          </label>
          <select
            id="download-variables"
            multiple
            size={5}
            value={vars}
            onChange={(e) => setVars([...e.target.selectedOptions].map((o) => o.value))}
            className="block w-full rounded-md border border-field bg-surface px-2 py-1 font-mono text-sm text-fg"
          >
            {l.variables.map((v) => (
              <option key={v.name} value={v.name}>
                {v.name}
              </option>
            ))}
          </select>
        </div>
      </div>
      <div className="flex flex-wrap items-center gap-2">
        <a className={buttonClass("primary")} href={href} download>
          Download v{l.version!.number}
        </a>
        <CopyButton text={`${window.location.origin}${href}`} what="Download link" label="Copy link" />
      </div>
      <p className="break-all font-mono text-xs text-muted">{href}</p>
    </form>
  );
}

/** The files built once at release, their SHA-256, and a check that the stored files still match. */
export function ReleaseFiles({ release }: { release: Release }) {
  const verify = useVerifyRelease();
  if (!release.files.length) {
    return <p className="text-sm text-muted">The release files are being prepared (this takes a few minutes after a release). The download above gives the same data meanwhile.</p>;
  }
  const checks = verify.data?.releaseId === release.id ? new Map(verify.data.items.map((i) => [i.name, i])) : null;
  return (
    <div className="space-y-3">
      <Table caption={`Files of release ${release.releaseNumber}`}>
        <thead>
          <tr>
            <Th>File</Th>
            <Th numeric>Size</Th>
            <Th>SHA-256</Th>
            {checks ? <Th>Check</Th> : null}
          </tr>
        </thead>
        <tbody>
          {release.files.map((f) => {
            const c = checks?.get(f.name);
            return (
              <Tr key={f.name}>
                <Td>
                  <a href={`/api/v1/releases/${release.id}/files/${encodeURIComponent(f.name)}`} download className="font-mono text-sm">
                    {f.name}
                  </a>
                </Td>
                <Td numeric>{mb(f.sizeBytes)}</Td>
                <Td>
                  <code className="break-all text-xs">{f.sha256}</code>
                </Td>
                {checks ? (
                  <Td className="whitespace-nowrap">{c?.ok ? <span>✓ matches</span> : <span className="font-semibold text-signal">✗ {c?.problem ?? "not checked"}</span>}</Td>
                ) : null}
              </Tr>
            );
          })}
        </tbody>
      </Table>
      <div className="flex flex-wrap items-center gap-3">
        <Button variant="secondary" size="sm" busy={verify.isPending} onClick={() => verify.mutate(release.id)}>
          Verify checksums
        </Button>
        <span aria-live="polite" className="text-sm">
          {verify.isPending
            ? "Reading the stored files…"
            : verify.error
              ? getErrorMessage(verify.error)
              : verify.data
                ? verify.data.ok
                  ? `✓ All ${verify.data.items.length} files match the SHA-256 fixed at release (checked ${verify.data.checkedAt.slice(11, 19)} UTC).`
                  : "✗ A stored file does not match its release record; do not use it, and tell the project's curators."
                : "Recomputes each file's SHA-256 on the server and compares it with the one fixed at release."}
        </span>
      </div>
      {verify.data && !verify.data.ok ? <Alert tone="attention">The repository team has to restore the file from a copy before it is served again.</Alert> : null}
    </div>
  );
}
