import { useMemo, useState } from "react";
import { Link, useParams, useSearchParams, type LoaderFunctionArgs } from "react-router-dom";
import type { Annotation } from "@shared/schemas/annotations";
import { derivedVocabulary, vocabulary, type DerivedVariable, type MeasuredVariable } from "@shared/vocabulary";
import { paths } from "@/config/paths";
import { queryClient } from "@/lib/query-client";
import { canContribute, useMe } from "@/lib/session";
import { showToast } from "@/lib/toast";
import { useDocumentTitle } from "@/lib/use-document-title";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Section } from "@/components/ui/section";
import { StateBadge } from "@/components/ui/state-badge";
import { exploreVersionQueryOptions, useExploreVersion, useTrack } from "@/features/plots/api/get-plot-window";
import { PlotExplorer, type DragMode } from "@/features/plots/components/plot-explorer";
import { panelsFor } from "@/features/plots/components/panels";
import { VersionMap } from "@/features/plots/components/version-map";
import { RecordsTable } from "@/features/records/components/records-table";
import { QcReportView } from "@/features/qc-report/components/qc-report-view";
import { useAnnotations } from "@/features/annotations/api/annotations";
import { AnnotationForm } from "@/features/annotations/components/annotation-form";
import { AnnotationList } from "@/features/annotations/components/annotation-list";

const VIEWS = [
  { id: "plots", label: "Plots" },
  { id: "records", label: "Records" },
  { id: "qc", label: "QC report" },
  { id: "map", label: "Map" },
] as const;
type View = (typeof VIEWS)[number]["id"];

const labelOf = (v: string) => ({
  label: v in vocabulary ? vocabulary[v as MeasuredVariable].label : (derivedVocabulary[v as DerivedVariable]?.longName ?? v),
  unit: v in vocabulary ? vocabulary[v as MeasuredVariable].canonicalUnit : (derivedVocabulary[v as DerivedVariable]?.unit ?? ""),
});

/** Explore one version: synchronised plots with flags, the records, the QC report, the map, and annotations. */
export function Component() {
  const { versionId = "" } = useParams();
  const [params, setParams] = useSearchParams();
  const { data: v, isPending, error } = useExploreVersion(versionId);
  const { data: me } = useMe();
  const track = useTrack(versionId);
  const [mode, setMode] = useState<DragMode>("zoom");
  const [hideFlagged, setHideFlagged] = useState(false);
  const [marked, setMarked] = useState<{ from: string; to: string } | null>(null);
  const [editing, setEditing] = useState<Annotation | null>(null);
  const member = v ? canContribute(me, v.projectId) : false;
  const annotations = useAnnotations(v?.datasetId ?? "", !!v && member);
  useDocumentTitle(v ? `Explore ${v.datasetTitle} v${v.number}` : "Explore");

  const view = (params.get("view") as View) || "plots";
  const from = params.get("from");
  const to = params.get("to");
  const set = (next: Record<string, string | null>) => {
    const p = new URLSearchParams(params);
    for (const [k, x] of Object.entries(next)) (x === null ? p.delete(k) : p.set(k, x));
    setParams(p, { replace: false });
  };

  const variables = useMemo(() => v?.summary?.variables.map((x) => x.variable).filter((x) => x in vocabulary || x in derivedVocabulary) ?? [], [v]);
  const labels = useMemo(() => Object.fromEntries(variables.map((x) => [x, labelOf(x)])), [variables]);
  const kind = track.data?.kind ?? "mooring";
  const shades = useMemo(
    () => [
      ...(annotations.data?.items ?? []).map((a) => ({ from: Date.parse(a.from) / 1000, to: Date.parse(a.to) / 1000, label: a.note })),
      ...(marked ? [{ from: Date.parse(marked.from) / 1000, to: Date.parse(marked.to) / 1000, label: "marked", pending: true }] : []),
    ],
    [annotations.data, marked],
  );

  if (isPending) return <Loading label="Loading the version…" />;
  if (error) throw error;
  const editable = member && (v.state === "ready" || v.state === "changes_requested");
  const defaultVars = panelsFor(variables, kind)[0]?.variables.map((x) => x.key) ?? variables.slice(0, 1);

  return (
    <>
      <PageHeader
        eyebrow={
          <nav aria-label="Breadcrumb" className="flex flex-wrap gap-1">
            <Link to={paths.dataset(v.datasetId)}>{v.datasetTitle}</Link> <span aria-hidden>/</span> <span>Version {v.number}</span>
          </nav>
        }
        title={
          <span className="inline-flex flex-wrap items-center gap-2">
            Explore version {v.number} <StateBadge state={v.state} />
          </span>
        }
        description={
          v.summary ? (
            <span className="num">
              {v.summary.rows.toLocaleString("en")} records · {v.summary.start?.slice(0, 16).replace("T", " ")} to {v.summary.end?.slice(0, 16).replace("T", " ")} UTC
            </span>
          ) : null
        }
      />
      {!v.summary ? (
        <Alert tone="info" title="Nothing to explore yet">
          This version has no records yet. Plots, records and the QC report appear once processing has finished.
        </Alert>
      ) : (
        <>
          <div role="tablist" aria-label="Views of this version" className="mb-5 flex flex-wrap gap-1 border-b border-line">
            {VIEWS.map((t) => (
              <button
                key={t.id}
                role="tab"
                type="button"
                aria-selected={view === t.id}
                onClick={() => set({ view: t.id === "plots" ? null : t.id })}
                className={
                  view === t.id ? "-mb-px rounded-t-md border border-b-surface border-line bg-surface px-4 py-2 font-semibold" : "px-4 py-2 text-muted hover:text-fg"
                }
                data-testid={`tab-${t.id}`}
              >
                {t.label}
              </button>
            ))}
          </div>

          {view === "plots" ? (
            <div className="space-y-6">
              {member && !editable ? (
                <Alert tone="info">
                  Version {v.number} is {v.state.replace("_", " ")}, so its flags cannot change. Manual flags you add are kept with the dataset and apply to the next version built.
                </Alert>
              ) : null}
              {marked || editing ? (
                <AnnotationForm
                  key={editing?.id ?? `${marked?.from}-${marked?.to}`}
                  datasetId={v.datasetId}
                  versionId={v.id}
                  variables={variables}
                  labels={labels}
                  initial={{ from: marked?.from ?? editing?.from ?? "", to: marked?.to ?? editing?.to ?? "", variables: defaultVars }}
                  editing={editing ?? undefined}
                  onCancel={() => {
                    setMarked(null);
                    setEditing(null);
                  }}
                  onDone={(r) => {
                    setMarked(null);
                    setEditing(null);
                    setMode("zoom");
                    showToast(
                      r.applied ? `Saved. ${r.applied.rowsChanged.toLocaleString("en")} values of version ${r.applied.versionNumber} now carry the manual flag.` : (r.note ?? "Saved."),
                      "success",
                      9000,
                    );
                  }}
                />
              ) : null}
              <PlotExplorer
                versionId={v.id}
                variables={variables}
                kind={kind}
                window={{ from, to }}
                onWindow={(a, b) => set({ from: a, to: b, variable: null })}
                mode={mode}
                onModeChange={setMode}
                hideFlagged={hideFlagged}
                onHideFlaggedChange={setHideFlagged}
                onMark={(a, b) => {
                  setEditing(null);
                  setMarked({ from: a, to: b });
                }}
                shades={shades}
                onShowNumbers={(a, b) => set({ view: "records", from: a, to: b })}
                canMark={member}
                platforms={v.summary.platforms.map((p) => p.id)}
                focus={{ variable: params.get("variable"), platform: params.get("platform") }}
              />
              {member ? (
                <Section
                  title="Annotations"
                  description="Notes and manual flags on stretches of this dataset. They carry over to every later version; each change is in the audit log."
                  action={
                    <Button
                      size="sm"
                      variant="secondary"
                      onClick={() => {
                        setEditing(null);
                        setMarked({ from: from ?? v.summary!.start!, to: to ?? v.summary!.end! });
                        window.scrollTo({ top: 0, behavior: "smooth" });
                      }}
                    >
                      Annotate the window shown…
                    </Button>
                  }
                >
                  <AnnotationList
                    datasetId={v.datasetId}
                    items={annotations.data?.items ?? []}
                    labels={labels}
                    canEdit={member}
                    onEdit={(a) => {
                      setMarked(null);
                      setEditing(a);
                      window.scrollTo({ top: 0, behavior: "smooth" });
                    }}
                    onShow={(a) => {
                      const pad = Math.max((Date.parse(a.to) - Date.parse(a.from)) * 0.5, 30 * 60_000);
                      set({ from: new Date(Date.parse(a.from) - pad).toISOString(), to: new Date(Date.parse(a.to) + pad).toISOString() });
                    }}
                  />
                </Section>
              ) : null}
            </div>
          ) : null}

          {view === "records" ? <RecordsTable versionId={v.id} variables={variables} labels={labels} initialFrom={from ?? undefined} initialTo={to ?? undefined} /> : null}
          {view === "qc" ? <QcReportView versionId={v.id} onJump={(a, b, focus) => set({ view: null, from: a, to: b, variable: focus?.variable ?? null, platform: focus?.platform ?? null })} /> : null}
          {view === "map" ? <VersionMap versionId={v.id} /> : null}
        </>
      )}
    </>
  );
}

export function loader({ params }: LoaderFunctionArgs) {
  void queryClient.prefetchQuery(exploreVersionQueryOptions(params.versionId ?? ""));
  return null;
}

export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
