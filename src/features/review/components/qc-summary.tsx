import { qcRunReportSchema, versionSummaryDataSchema, type VersionSummaryData } from "@shared/schemas/versions";
import type { VersionReview } from "@shared/schemas/curation";
import { derivedVocabulary, vocabulary } from "@shared/vocabulary";
import { Link } from "react-router-dom";
import { paths } from "@/config/paths";
import { formatUtc } from "@/lib/format";
import { testWord } from "@/lib/qc-tests";
import { aroundStretch } from "@/lib/stretch-window";
import { FlagBadge, type QcFlag } from "@/components/ui/flag-badge";
import { FlagCountsTable } from "@/components/ui/flag-counts-table";
import { Table, Td, Th, Tr } from "@/components/ui/table";

export const shownFlags: QcFlag[] = [1, 2, 3, 4, 9];

/** The readable name of a canonical variable key. */
export function variableLabel(key: string): string {
  return (
    (vocabulary as Record<string, { label: string }>)[key]?.label ?? (derivedVocabulary as Record<string, { longName: string }>)[key]?.longName ?? key.replace(/_/g, " ")
  );
}

const int = (n: number) => Math.round(n).toLocaleString("en-GB").replace(/,/g, "\u202f");

export function parseSummary(summary: unknown): VersionSummaryData | null {
  const r = versionSummaryDataSchema.safeParse(summary);
  return r.success ? r.data : null;
}

/** Flag counts per variable for the whole version, which tests raised suspect or fail, and the worst stretches. */
export function QcSummary({ review }: { review: VersionReview }) {
  /** The plots around a stretch, its variable's plot in view. */
  const plotsOf = (s: VersionReview["stretches"][number]) =>
    paths.versionExplore(review.version.id, { ...aroundStretch(s.from, s.to), variable: s.variable, platform: s.platform || undefined });
  const summary = parseSummary(review.version.summary);
  const report = qcRunReportSchema.safeParse(review.qc);
  if (!summary) {
    return <p className="text-muted">No QC summary yet: the version has not finished processing.</p>;
  }
  const tests = report.success ? Object.entries(report.data.testCounts).filter(([, t]) => Object.keys(t).length) : [];
  return (
    <div className="space-y-6">
      <p className="text-[0.95rem]">
        <span className="num">{int(summary.rows)}</span> records from <span className="num">{formatUtc(summary.start)}</span> to{" "}
        <span className="num">{formatUtc(summary.end)}</span>
        {report.success ? (
          <>
            {" "}
            · this build read <span className="num">{int(report.data.rowsRead)}</span>, wrote <span className="num">{int(report.data.rowsWritten)}</span>
            {report.data.rowsDropped ? (
              <>
                , dropped <span className="num">{int(report.data.rowsDropped)}</span> without a usable time
              </>
            ) : null}
          </>
        ) : null}
        .
      </p>
      <FlagCountsTable
        caption="QC flag counts per variable"
        flags={shownFlags}
        lead={["Variable · unit"]}
        rows={summary.variables.map((v) => ({
          key: v.variable,
          cells: [
            <>
              <span className="font-semibold">{variableLabel(v.variable)}</span>
              <span className="block font-mono text-xs text-muted">
                {v.variable} · {v.unit}
              </span>
            </>,
          ],
          counts: v.flags,
        }))}
      />

      {tests.length ? (
        <div>
          <h3 className="mb-2 font-semibold">Tests that raised flags in this build</h3>
          <Table caption="Suspect and fail counts per QC test and variable">
            <thead>
              <tr>
                <Th>Variable</Th>
                <Th>Test</Th>
                <Th numeric>
                  <FlagBadge flag={3} />
                </Th>
                <Th numeric>
                  <FlagBadge flag={4} />
                </Th>
              </tr>
            </thead>
            <tbody>
              {tests.flatMap(([variable, t]) =>
                Object.entries(t).map(([test, [suspect, fail]]) => (
                  <Tr key={`${variable}-${test}`}>
                    <Td>{variableLabel(variable)}</Td>
                    <Td>{testWord(test)}</Td>
                    <Td numeric>{int(suspect)}</Td>
                    <Td numeric>{int(fail)}</Td>
                  </Tr>
                )),
              )}
            </tbody>
          </Table>
        </div>
      ) : null}

      <div>
        <h3 className="mb-2 font-semibold">Longest flagged stretches</h3>
        {review.stretches.length === 0 ? (
          <p className="text-muted">No hour of this version has a suspect or failed value.</p>
        ) : (
          <Table caption="Longest stretches of hours with suspect or failed values">
            <thead>
              <tr>
                <Th>Worst flag</Th>
                <Th>Variable</Th>
                <Th>Platform</Th>
                <Th>From (UTC)</Th>
                <Th>To (UTC)</Th>
                <Th numeric unit="h">
                  Length
                </Th>
                <Th>
                  <span className="sr-only">Plots</span>
                </Th>
              </tr>
            </thead>
            <tbody>
              {review.stretches.map((s, i) => (
                <Tr key={i}>
                  <Td>
                    <FlagBadge flag={s.worstFlag as QcFlag} />
                  </Td>
                  <Td>{variableLabel(s.variable)}</Td>
                  <Td>{s.platform || "—"}</Td>
                  <Td className="num">{formatUtc(s.from)}</Td>
                  <Td className="num">{formatUtc(s.to)}</Td>
                  <Td numeric>{s.hours}</Td>
                  <Td>
                    <Link to={plotsOf(s)} aria-label={`Plot ${variableLabel(s.variable)} from ${formatUtc(s.from)}`} className="whitespace-nowrap">
                      Plot
                    </Link>
                  </Td>
                </Tr>
              ))}
            </tbody>
          </Table>
        )}
      </div>
    </div>
  );
}
