import { useMemo, useState } from "react";
import type { PlotSeries } from "@shared/schemas/explore";
import type { ArrayDiagnostics } from "@shared/schemas/versions";
import { Button, buttonClass } from "@/components/ui/button";
import type { PanelDef } from "@/features/plots/components/panels";
import { PlotPanel } from "@/features/plots/components/plot-panel";
import { getErrorMessage } from "@/lib/api-client";
import { Alert } from "@/components/ui/alert";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { Section } from "@/components/ui/section";
import { Table, Td, Th } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";
import { useArrayDiagnostics } from "../api/get-array-diagnostics";

const iso = (t: number) => new Date(t * 1000).toISOString();
const sci = (x: number | null, scale: number, digits = 3) => (x === null ? "—" : (x * scale).toFixed(digits));

function stats(a: (number | null)[]) {
  const xs = a.filter((x): x is number => x !== null);
  if (!xs.length) return null;
  return { n: xs.length, min: Math.min(...xs), max: Math.max(...xs), mean: xs.reduce((s, x) => s + x, 0) / xs.length };
}

/** Wind-stress curl, Ekman pumping and Sverdrup transport of the project's mooring array (hourly steps). */
export function ArrayDiagnosticsSection({ projectId }: { projectId: string }) {
  const q = useArrayDiagnostics(projectId);
  return (
    <Section
      title="Array diagnostics"
      description="Wind-stress curl from a least-squares plane fit over the moorings (and drifters measuring wind), Ekman pumping (with the β term) and Sverdrup transport, at hourly steps where three or more of them within 500 km have a wind stress."
    >
      {q.isPending ? <Loading /> : q.error ? <Alert tone="attention">{getErrorMessage(q.error)}</Alert> : <Body d={q.data} projectId={projectId} />}
    </Section>
  );
}

/** The three series as plot panels, in the units the tables use. */
const PANELS: (PanelDef & { pick: (d: ArrayDiagnostics) => (number | null)[]; scale: number })[] = [
  { id: "array-curl", title: "Wind-stress curl", unit: "10-7 N m-3", variables: [{ key: "curl", label: "curl of the plane fit" }], pick: (d) => d.curl, scale: 1e7 },
  { id: "array-pumping", title: "Ekman pumping, upward positive", unit: "m day-1", variables: [{ key: "ekman_pumping", label: "Ekman pumping" }], pick: (d) => d.ekmanPumping, scale: 86400 },
  { id: "array-sverdrup", title: "Sverdrup transport per unit width", unit: "m2 s-1", variables: [{ key: "sverdrup", label: "Sverdrup transport" }], pick: (d) => d.sverdrup, scale: 1 },
];

/** One step per hour with a value: a "bucket" whose min, mean and max are that value. */
function seriesOf(d: ArrayDiagnostics): PlotSeries[] {
  return PANELS.map((p) => {
    const out: PlotSeries = { variable: p.variables[0]!.key, platform: "", unit: p.unit, t: [], min: [], max: [], mean: [], n: [], worstFlag: [] };
    p.pick(d).forEach((x, i) => {
      if (x === null) return;
      const v = x * p.scale;
      out.t.push(d.time[i]!);
      out.min.push(v);
      out.max.push(v);
      out.mean.push(v);
      out.n.push(1);
      out.worstFlag.push(1);
    });
    return out;
  });
}

function Body({ d, projectId }: { d: ArrayDiagnostics; projectId: string }) {
  const series = useMemo(() => seriesOf(d), [d]);
  const [zoom, setZoom] = useState<{ from: number; to: number } | null>(null);
  const steps = d.time.length;
  if (!steps || !d.curl.some((x) => x !== null))
    return (
      <EmptyState title="No array diagnostics yet">
        {d.note ?? "They are computed after a version is built, once three or more moorings with a position (or drifters measuring wind) overlap in time within 500 km."}
      </EmptyState>
    );
  const rows = d.time.map((t, i) => ({ t, used: d.used[i]!, curl: d.curl[i]!, w: d.ekmanPumping[i]!, sv: d.sverdrup[i]! })).filter((r) => r.used >= 3);
  const last = rows.slice(-24).reverse();
  const s = { curl: stats(d.curl), w: stats(d.ekmanPumping), sv: stats(d.sverdrup) };
  return (
    <div className="space-y-3">
      <p className="text-sm">
        From {d.inputs.length} {d.inputs.some((i) => i.kind === "drifter") ? "platforms" : "moorings"}:{" "}
        {d.inputs
          .map((i) =>
            i.kind === "drifter"
              ? `${i.title} v${i.versionNumber}, drifter ${i.platform} (mean ${i.latitude.toFixed(3)}° N, ${i.longitude.toFixed(3)}° E)`
              : `${i.title} v${i.versionNumber} (${i.latitude.toFixed(3)}° N, ${i.longitude.toFixed(3)}° E)`,
          )
          .join("; ")}
        . Steps with a result:{" "}
        <span className="num">{rows.length}</span>, from <UtcTime iso={iso(rows[0]!.t)} /> to <UtcTime iso={iso(rows[rows.length - 1]!.t)} />.
        {d.computedAt ? (
          <>
            {" "}
            Computed <UtcTime iso={d.computedAt} />.
          </>
        ) : null}
      </p>
      {d.note ? <p className="text-sm text-muted">{d.note}</p> : null}
      <div className="flex flex-wrap items-center gap-3 text-sm text-muted">
        <span>Hourly values; drag across a plot to zoom in.</span>
        <a className={buttonClass("secondary", "sm")} href={`/api/v1/projects/${projectId}/array-diagnostics?format=csv`} download>
          CSV of every step
        </a>
        {zoom ? (
          <Button size="sm" variant="secondary" onClick={() => setZoom(null)}>
            Whole period
          </Button>
        ) : null}
      </div>
      {PANELS.map((p) => (
        <PlotPanel
          key={p.id}
          panel={p}
          series={series}
          from={zoom?.from ?? rows[0]!.t}
          to={zoom?.to ?? rows[rows.length - 1]!.t + d.stepS}
          stepS={d.stepS}
          hideFlagged={false}
          shades={[]}
          onSelect={(from, to) => setZoom({ from, to })}
          syncKey={`array-${d.projectId}`}
        />
      ))}
      <Table caption="Array diagnostics: range over all steps">
        <thead>
          <tr>
            <Th>Quantity</Th>
            <Th numeric>Min</Th>
            <Th numeric>Mean</Th>
            <Th numeric>Max</Th>
          </tr>
        </thead>
        <tbody>
          <tr>
            <Td>Wind-stress curl (10⁻⁷ N m⁻³)</Td>
            <Td numeric>{sci(s.curl?.min ?? null, 1e7)}</Td>
            <Td numeric>{sci(s.curl?.mean ?? null, 1e7)}</Td>
            <Td numeric>{sci(s.curl?.max ?? null, 1e7)}</Td>
          </tr>
          <tr>
            <Td>Ekman pumping, upward positive (m day⁻¹)</Td>
            <Td numeric>{sci(s.w?.min ?? null, 86400)}</Td>
            <Td numeric>{sci(s.w?.mean ?? null, 86400)}</Td>
            <Td numeric>{sci(s.w?.max ?? null, 86400)}</Td>
          </tr>
          <tr>
            <Td>Sverdrup transport per unit width (m² s⁻¹)</Td>
            <Td numeric>{sci(s.sv?.min ?? null, 1)}</Td>
            <Td numeric>{sci(s.sv?.mean ?? null, 1)}</Td>
            <Td numeric>{sci(s.sv?.max ?? null, 1)}</Td>
          </tr>
        </tbody>
      </Table>
      <Table caption="Array diagnostics: the latest 24 hourly steps">
        <thead>
          <tr>
            <Th>Hour starting (UTC)</Th>
            <Th numeric>{d.inputs.some((i) => i.kind === "drifter") ? "Platforms used" : "Moorings used"}</Th>
            <Th numeric unit="10⁻⁷ N m⁻³">Curl</Th>
            <Th numeric unit="m day⁻¹">Ekman pumping</Th>
            <Th numeric unit="m² s⁻¹">Sverdrup</Th>
          </tr>
        </thead>
        <tbody>
          {last.map((r) => (
            <tr key={r.t}>
              <Td>
                <UtcTime iso={iso(r.t)} />
              </Td>
              <Td numeric>{r.used}</Td>
              <Td numeric>{sci(r.curl, 1e7)}</Td>
              <Td numeric>{sci(r.w, 86400)}</Td>
              <Td numeric>{sci(r.sv, 1)}</Td>
            </tr>
          ))}
        </tbody>
      </Table>
      <Alert tone="info" title="Estimates for science">
        {d.caution}
      </Alert>
    </div>
  );
}
