import type { VersionReview } from "@shared/schemas/curation";
import type { VariableStats } from "@shared/schemas/versions";
import { getErrorMessage } from "@/lib/api-client";
import { formatUtc } from "@/lib/format";
import { Alert } from "@/components/ui/alert";
import { Loading } from "@/components/ui/loading";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { useVersionComparison } from "../api/get-version-review";
import { parseSummary, variableLabel } from "./qc-summary";

const int = (n: number) => Math.round(n).toLocaleString("en-GB").replace(/,/g, "\u202f");
/** Four significant digits with a true minus sign; "—" when missing. */
const num = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? "—" : Number(v.toPrecision(4)).toString().replace(/^-/, "−"));
const pct = (v: number | null | undefined) => (v === null || v === undefined ? "—" : `${(v * 100).toFixed(1)}`);

/** Minimum over maximum, stacked to keep the side-by-side table narrow. */
function Range({ s }: { s: VariableStats }) {
  return (
    <>
      <span className="block">{num(s.min)}</span>
      <span className="block text-muted">{num(s.max)}</span>
    </>
  );
}

function Stat({ label, value, testId }: { label: string; value: string; testId?: string }) {
  return (
    <div className="rounded-md border border-line bg-surface px-3 py-2">
      <dt className="text-sm text-muted">{label}</dt>
      <dd className="num text-xl font-semibold" data-testid={testId}>
        {value}
      </dd>
    </div>
  );
}

/** Rows added, removed and changed, flags changed, statistics side by side, and time coverage against the previous version. */
export function VersionComparison({ review }: { review: VersionReview }) {
  const { data, isPending, error } = useVersionComparison(review.version.id);
  const cur = parseSummary(review.version.summary);
  const prev = parseSummary(review.previous?.summary);
  if (!review.previous) {
    return <p className="text-muted">This is the first version of the dataset, so there is nothing to compare it with.</p>;
  }
  const p = review.previous;
  const names = [...new Set([...(cur?.variables ?? []), ...(prev?.variables ?? [])].map((v) => v.variable))];
  const statOf = (s: typeof cur, name: string): VariableStats | undefined => s?.variables.find((v) => v.variable === name);
  const changes = new Map((data?.variables ?? []).map((v) => [v.variable, v]));

  return (
    <div className="space-y-6">
      <p className="text-[0.95rem]">
        Compared with version <span className="num">{p.number}</span> ({p.state.replace("_", " ")}).
      </p>
      {isPending ? (
        <Loading label="Comparing records…" />
      ) : error ? (
        <Alert tone="attention" title="The comparison could not be made">
          {getErrorMessage(error)}
        </Alert>
      ) : (
        <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
          <Stat label="Rows added" value={int(data.rowsAdded)} testId="rows-added" />
          <Stat label="Rows removed" value={int(data.rowsRemoved)} testId="rows-removed" />
          <Stat label="Rows changed" value={int(data.rowsChanged)} testId="rows-changed" />
          <Stat label="Flags changed" value={int(data.variables.reduce((a, v) => a + v.flagsChanged, 0))} testId="flags-changed" />
        </dl>
      )}

      {names.length ? (
        <Table caption={`Statistics per variable, version ${p.number} beside version ${review.version.number}`}>
          <thead>
            <tr>
              <Th>Variable (unit)</Th>
              <Th numeric>Count v{p.number}</Th>
              <Th numeric>Count v{review.version.number}</Th>
              <Th numeric>Mean v{p.number}</Th>
              <Th numeric>Mean v{review.version.number}</Th>
              <Th numeric>Min / max v{p.number}</Th>
              <Th numeric>Min / max v{review.version.number}</Th>
              <Th numeric title="Rows in both versions whose flag differs">
                Flags Δ
              </Th>
              <Th numeric title="Rows in both versions whose value differs">
                Values Δ
              </Th>
            </tr>
          </thead>
          <tbody>
            {names.map((n) => {
              const a = statOf(prev, n);
              const b = statOf(cur, n);
              const c = changes.get(n);
              return (
                <Tr key={n}>
                  <Td>
                    {variableLabel(n)} <span className="whitespace-nowrap font-mono text-xs text-muted">({(b ?? a)?.unit ?? ""})</span>
                  </Td>
                  <Td numeric>{a ? int(a.count) : "—"}</Td>
                  <Td numeric>{b ? int(b.count) : "—"}</Td>
                  <Td numeric>{num(a?.mean)}</Td>
                  <Td numeric>{num(b?.mean)}</Td>
                  <Td numeric className="text-sm">{a ? <Range s={a} /> : "—"}</Td>
                  <Td numeric className="text-sm">{b ? <Range s={b} /> : "—"}</Td>
                  <Td numeric>{c ? int(c.flagsChanged) : "—"}</Td>
                  <Td numeric>{c ? int(c.valuesChanged) : "—"}</Td>
                </Tr>
              );
            })}
          </tbody>
        </Table>
      ) : null}
      <p className="text-sm text-muted">Statistics use values flagged pass or not evaluated. Δ counts rows present in both versions whose flag or value differs.</p>

      <Table caption="Time coverage and gaps">
        <thead>
          <tr>
            <Th>Version</Th>
            <Th>First record (UTC)</Th>
            <Th>Last record (UTC)</Th>
            <Th numeric unit="%">
              Coverage
            </Th>
            <Th numeric>Gaps</Th>
          </tr>
        </thead>
        <tbody>
          {[
            [p.number, prev],
            [review.version.number, cur],
          ].map(([n, s]) => {
            const sum = s as typeof cur;
            return (
              <Tr key={String(n)}>
                <Td numeric className="text-left">
                  v{n as number}
                </Td>
                <Td className="num">{formatUtc(sum?.start)}</Td>
                <Td className="num">{formatUtc(sum?.end)}</Td>
                <Td numeric>{pct(sum?.coverage)}</Td>
                <Td numeric>{sum ? int(sum.gapCount) : "—"}</Td>
              </Tr>
            );
          })}
        </tbody>
      </Table>
      {cur && cur.gaps.length ? (
        <div>
          <h3 className="mb-2 font-semibold">Longest gaps in version {review.version.number}</h3>
          <ul className="space-y-1 text-[0.95rem]">
            {cur.gaps.slice(0, 5).map((g, i) => (
              <li key={i} className="num">
                {formatUtc(g.from)} → {formatUtc(g.to)} ({(g.seconds / 3600).toFixed(1)} h){g.platform ? ` · ${g.platform}` : ""}
              </li>
            ))}
          </ul>
        </div>
      ) : null}
    </div>
  );
}
