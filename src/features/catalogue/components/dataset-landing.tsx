import { useState } from "react";
import type { CitationForms, DatasetLanding } from "@shared/schemas/catalogue";
import { formatLat, formatLon, formatUtc } from "@/lib/format";
import { FlagBadge } from "@/components/ui/flag-badge";
import { Section } from "@/components/ui/section";
import { BaseMap } from "@/components/map/base-map";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { CopyButton } from "./copy-button";

/** Time coverage, position and size of the version the page describes. */
export function CoverageFacts({ l }: { l: DatasetLanding }) {
  const b = l.bounds;
  const point = b && b.west === b.east && b.south === b.north;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-2 text-[0.95rem] sm:grid-cols-[auto_1fr_auto_1fr]">
      <dt className="text-muted">First record</dt>
      <dd className="num">{formatUtc(l.startTime, true)}</dd>
      <dt className="text-muted">Last record</dt>
      <dd className="num">{formatUtc(l.endTime, true)}</dd>
      <dt className="text-muted">{point ? "Position" : "Area"}</dt>
      <dd className="num">
        {!b ? "—" : point ? `${formatLat(b.south)}, ${formatLon(b.west)}` : `${formatLat(b.south)} to ${formatLat(b.north)}, ${formatLon(b.west)} to ${formatLon(b.east)}`}
      </dd>
      <dt className="text-muted">Records</dt>
      <dd className="num">{l.rows === null ? "—" : l.rows.toLocaleString("en-GB")}</dd>
      <dt className="text-muted">Version</dt>
      <dd className="num">{l.version ? `v${l.version.number}` : "—"}</dd>
      <dt className="text-muted">Licence</dt>
      <dd>{l.licence}</dd>
    </dl>
  );
}

const pct = (n: number, of: number | null) => (of ? `${((100 * n) / of).toFixed(1)}` : "—");

/** Variables with their CF standard names and canonical units, and how their values were flagged. */
export function VariablesTable({ l }: { l: DatasetLanding }) {
  if (!l.variables.length) return <p className="text-sm text-muted">No variables recorded for this version.</p>;
  return (
    <Table caption="Variables in this version">
      <thead>
        <tr>
          <Th>Column and CF standard name</Th>
          <Th>Unit</Th>
          <Th numeric>Values</Th>
          <Th numeric unit="%">
            <span className="inline-flex items-center gap-1">
              <FlagBadge flag={1} />
            </span>
          </Th>
          <Th numeric unit="%">
            <FlagBadge flag={3} />
          </Th>
          <Th numeric unit="%">
            <FlagBadge flag={4} />
          </Th>
        </tr>
      </thead>
      <tbody>
        {l.variables.map((v) => (
          <Tr key={v.name}>
            <Td className="max-w-[26rem]">
              <code className="break-all text-sm font-semibold">{v.name}</code>
              <div className="text-sm text-muted">
                {v.longName} ·{" "}
                {v.standardName === v.name ? (
                  "CF standard name"
                ) : v.standardName ? (
                  <>
                    CF: <code className="break-all">{v.standardName}</code>
                  </>
                ) : (
                  "no CF standard name (Tauline's name)"
                )}
              </div>
            </Td>
            <Td className="whitespace-nowrap">
              <code className="text-sm">{v.units}</code>
            </Td>
            <Td numeric>{v.count === null ? "—" : v.count.toLocaleString("en-GB")}</Td>
            <Td numeric>{pct(v.flags[1] ?? 0, v.count)}</Td>
            <Td numeric>{pct(v.flags[3] ?? 0, v.count)}</Td>
            <Td numeric>{pct(v.flags[4] ?? 0, v.count)}</Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}

const forms = [
  { key: "text", label: "Plain text" },
  { key: "bibtex", label: "BibTeX" },
  { key: "ris", label: "RIS" },
] as const;

/** The current release's citation in three forms, each ready to copy. */
export function CitationBlock({ citation }: { citation: CitationForms }) {
  const [form, setForm] = useState<(typeof forms)[number]["key"]>("text");
  const text = citation[form];
  return (
    <div className="space-y-2">
      <div role="tablist" aria-label="Citation format" className="flex gap-1">
        {forms.map((f) => (
          <button
            key={f.key}
            role="tab"
            type="button"
            aria-selected={form === f.key}
            onClick={() => setForm(f.key)}
            className="rounded-md border border-line px-3 py-1 text-sm aria-selected:border-fg aria-selected:font-semibold"
          >
            {f.label}
          </button>
        ))}
      </div>
      <pre role="tabpanel" aria-label={`Citation as ${forms.find((f) => f.key === form)!.label}`} className="overflow-x-auto whitespace-pre-wrap rounded-md border border-line bg-surface p-3 font-mono text-sm">
        {text}
      </pre>
      <CopyButton text={text} what="Citation" label={`Copy ${forms.find((f) => f.key === form)!.label}`} />
    </div>
  );
}

/** The landing-page sections a visitor needs first: coverage, variables, citation. */
export function LandingSections({ l }: { l: DatasetLanding }) {
  return (
    <>
      <Section title="Time and place" description="Of the version this page describes; times in UTC.">
        <div className="grid gap-4 md:grid-cols-[1fr_16rem]">
          <CoverageFacts l={l} />
          {l.bounds ? (
            <BaseMap
              label={`Where ${l.title} was measured`}
              points={[{ id: l.id, lon: (l.bounds.west + l.bounds.east) / 2, lat: (l.bounds.south + l.bounds.north) / 2, label: l.platformName ?? l.title }]}
              extent={l.bounds.west === l.bounds.east ? undefined : [l.bounds.west, l.bounds.south, l.bounds.east, l.bounds.north]}
              height={180}
              viewWidth={320}
              minPadDeg={3}
            />
          ) : null}
        </div>
      </Section>
      <Section title="Variables" description="One column per variable in its canonical unit, each with a QC flag column. Shares of values by flag.">
        <VariablesTable l={l} />
      </Section>
      {l.citation ? (
        <Section title="Cite this dataset" description="The citation of the current release. It never changes, even after later releases.">
          <CitationBlock citation={l.citation} />
        </Section>
      ) : null}
    </>
  );
}
