import { useMemo, useState, type ReactNode } from "react";
import type { ColumnMap, ColumnMapInput } from "@shared/schemas/column-map";
import type { ColumnMapRevision } from "@shared/schemas/uploads";
import { checkColumnMap, type Dialect } from "@shared/sniff";
import { allowedUnits, resolveVariable, vocabulary, measuredVariables, type MeasuredVariable } from "@shared/vocabulary";
import { getErrorMessage } from "@/lib/api-client";
import { showToast } from "@/lib/toast";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { UtcTime } from "@/components/ui/utc-time";
import { useCreateColumnMap } from "../api/create-column-map";

/** Variables a column can hold: the canonical ones plus bearings written the other way round. */
const variableOptions: { value: string; label: string }[] = [
  ...measuredVariables.map((v) => ({ value: v, label: `${vocabulary[v].label} — ${v}` })),
  { value: "wind_to_direction", label: "Wind direction (to) — wind_to_direction" },
  { value: "sea_water_velocity_from_direction", label: "Current direction (from) — sea_water_velocity_from_direction" },
];

const timeFormats = [
  { value: "iso8601", label: "ISO 8601 (2026-03-05T12:00:00Z)" },
  { value: "epoch_seconds", label: "Seconds since 1970-01-01 UTC" },
  { value: "epoch_milliseconds", label: "Milliseconds since 1970-01-01 UTC" },
  { value: "DD/MM/YYYY hh:mm:ss", label: "DD/MM/YYYY hh:mm:ss" },
  { value: "DD/MM/YYYY hh:mm", label: "DD/MM/YYYY hh:mm" },
  { value: "MM/DD/YYYY hh:mm:ss", label: "MM/DD/YYYY hh:mm:ss" },
  { value: "YYYY-MM-DD hh:mm:ss", label: "YYYY-MM-DD hh:mm:ss" },
];

interface ColumnChoice {
  variable: string;
  unit: string;
  reference: "true" | "magnetic";
  declinationDeg: number;
}

interface Draft {
  timeCol: number;
  /** A separate time-of-day column joined to a date column, or -1. */
  timeOfDayCol: number;
  format: string;
  zone: string;
  missing: string;
  platformCol: number;
  choices: ColumnChoice[];
}

const control = "block w-full rounded-md border border-field bg-surface px-2 py-1.5 text-fg aria-[invalid=true]:border-2 aria-[invalid=true]:border-signal";

function refIndex(ref: string | number | undefined, header: string[] | null): number {
  if (ref === undefined) return -1;
  if (typeof ref === "number") return ref - 1;
  return header ? header.indexOf(ref) : /^\d+$/.test(ref) ? Number(ref) - 1 : -1;
}

function toDraft(map: ColumnMapInput | null, header: string[] | null, width: number): Draft {
  const choices: ColumnChoice[] = Array.from({ length: width }, () => ({ variable: "", unit: "", reference: "true", declinationDeg: 0 }));
  for (const c of map?.columns ?? []) {
    const i = refIndex(c.column, header);
    if (i >= 0 && i < width) choices[i] = { variable: c.variable, unit: c.unit, reference: c.reference ?? "true", declinationDeg: c.declinationDeg ?? 0 };
  }
  const t = map?.time;
  return {
    timeCol: refIndex(t?.columns?.[0], header),
    timeOfDayCol: refIndex(t?.columns?.[1], header),
    format: t?.format ?? "iso8601",
    zone: t?.zone ?? "",
    missing: (map?.missingValues ?? ["", "NaN", "nan", "NA", "-999", "-9999"]).filter((m) => m !== "").join(", "),
    platformCol: refIndex(map?.platformColumn, header),
    choices,
  };
}

function toMap(d: Draft, dialect: Dialect, header: string[] | null): ColumnMapInput {
  const ref = (i: number) => (header ? header[i]! : i + 1);
  const columns = d.choices
    .map((c, i) => ({ c, i }))
    .filter(({ c }) => c.variable)
    .map(({ c, i }) => {
      const r = resolveVariable(c.variable);
      const bearing = r ? vocabulary[r.canonical].convention !== undefined : false;
      return { column: ref(i), variable: c.variable, unit: c.unit, ...(bearing ? { reference: c.reference, declinationDeg: c.reference === "magnetic" ? c.declinationDeg : 0 } : {}) };
    });
  return {
    version: 1,
    delimiter: dialect.delimiter,
    decimalMark: dialect.decimalMark,
    headerRow: dialect.headerRow,
    skipRows: dialect.skipRows,
    missingValues: ["", ...d.missing.split(",").map((m) => m.trim()).filter(Boolean)],
    time: { columns: d.timeCol < 0 ? [] : d.timeOfDayCol >= 0 ? [ref(d.timeCol), ref(d.timeOfDayCol)] : [ref(d.timeCol)], format: d.format, zone: d.zone.trim() === "" ? null : d.zone.trim() },
    ...(d.platformCol >= 0 ? { platformColumn: ref(d.platformCol) } : {}),
    columns,
  };
}

export interface ColumnMapEditorProps {
  header: string[] | null;
  rows: string[][];
  dialect: Dialect;
  /** The map to start from (suggested or saved). */
  initial: ColumnMapInput | null;
  initialSource: "platform" | "headers" | null;
  notes: string[];
  platformId: string | null;
  uploadId: string;
  history: ColumnMapRevision[];
  /** More actions beside "Save map", given the map when it is valid. */
  actions?: (map: ColumnMap | null) => ReactNode;
}

/** Maps each column of a file to a canonical variable, unit and direction convention; saves maps per platform. */
export function ColumnMapEditor({ header, rows, dialect, initial, initialSource, notes, platformId, uploadId, history, actions }: ColumnMapEditorProps) {
  const width = Math.max(header?.length ?? 0, ...rows.map((r) => r.length), 1);
  const [draft, setDraft] = useState<Draft>(() => toDraft(initial, header, width));
  const [note, setNote] = useState("");
  const [loadedFrom, setLoadedFrom] = useState<string | null>(initialSource === "platform" ? "the platform's last saved map" : initialSource === "headers" ? "the file's headers" : null);
  const [shownNotes, setShownNotes] = useState(notes);
  const save = useCreateColumnMap(platformId ?? "");
  const [saveError, setSaveError] = useState<string | null>(null);

  const mapInput = useMemo(() => toMap(draft, dialect, header), [draft, dialect, header]);
  const checked = useMemo(() => checkColumnMap(mapInput, header), [mapInput, header]);
  const problems = checked.ok ? [] : checked.problems;
  const columnIndexOfMapped = draft.choices.map((c, i) => ({ c, i })).filter(({ c }) => c.variable).map(({ i }) => i);
  const rowProblems = (i: number) =>
    problems.filter((p) => {
      const m = /^columns\.(\d+)\./.exec(p.path);
      return m ? columnIndexOfMapped[Number(m[1])] === i : false;
    });
  const generalProblems = problems.filter((p) => !/^columns\.\d+\./.test(p.path));
  const name = (i: number) => (header?.[i] ? header[i] : `Column ${i + 1}`);
  const set = (patch: Partial<Draft>) => setDraft((d) => ({ ...d, ...patch }));
  const setChoice = (i: number, patch: Partial<ColumnChoice>) =>
    setDraft((d) => ({ ...d, choices: d.choices.map((c, k) => (k === i ? { ...c, ...patch } : c)) }));
  const columnOptions = Array.from({ length: width }, (_, i) => ({ value: String(i), label: name(i) }));

  const onSave = () => {
    if (!checked.ok || !platformId) return;
    setSaveError(null);
    save.mutate(
      { map: checked.map, note: note.trim() || undefined, uploadId },
      {
        onSuccess: (r) => {
          showToast(`Column map saved as revision ${r.revision} for this platform.`, "success");
          setNote("");
        },
        onError: (e) => setSaveError(getErrorMessage(e)),
      },
    );
  };

  return (
    <div className="space-y-5" data-testid="column-map-editor">
      {loadedFrom ? (
        <Alert tone="info" title={`Started from ${loadedFrom}`}>
          {shownNotes.length ? (
            <ul className="list-disc pl-5">
              {shownNotes.map((n, i) => (
                <li key={i}>{n}</li>
              ))}
            </ul>
          ) : (
            "Check each column before saving."
          )}
        </Alert>
      ) : null}

      <fieldset className="grid gap-3 rounded-lg border border-line p-4 sm:grid-cols-2 lg:grid-cols-4">
        <legend className="px-1 font-semibold">Time</legend>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Time column
          <select className={control} aria-invalid={generalProblems.some((p) => p.path.startsWith("time.columns")) || undefined} value={String(draft.timeCol)} onChange={(e) => set({ timeCol: Number(e.target.value) })}>
            <option value="-1">Choose…</option>
            {columnOptions.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Time-of-day column (if separate)
          <select className={control} value={String(draft.timeOfDayCol)} onChange={(e) => set({ timeOfDayCol: Number(e.target.value) })}>
            <option value="-1">None: one column holds date and time</option>
            {columnOptions.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Format
          <select className={control} value={timeFormats.some((f) => f.value === draft.format) ? draft.format : draft.format} onChange={(e) => set({ format: e.target.value })}>
            {[...timeFormats, ...(timeFormats.some((f) => f.value === draft.format) ? [] : [{ value: draft.format, label: draft.format }])].map((f) => (
              <option key={f.value} value={f.value}>
                {f.label}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Zone for times written without one
          <input className={control} value={draft.zone} placeholder="UTC or +02:00; empty = such times are errors" onChange={(e) => set({ zone: e.target.value })} aria-invalid={generalProblems.some((p) => p.path.startsWith("time.zone")) || undefined} />
        </label>
      </fieldset>

      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Missing-value codes" hint="Comma-separated texts that mean “no value”; empty fields always do." value={draft.missing} onChange={(e) => set({ missing: e.target.value })} />
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Platform id column (files with several drifters)
          <select className={control} value={String(draft.platformCol)} onChange={(e) => set({ platformCol: Number(e.target.value) })}>
            <option value="-1">None: one platform per file</option>
            {columnOptions.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
        </label>
      </div>

      <div className="overflow-x-auto rounded-lg border border-line bg-surface">
        <table className="w-full min-w-[56rem] border-collapse text-[0.95rem]">
          <caption className="sr-only">Variable, unit and direction for each column of the file</caption>
          <thead>
            <tr>
              {["Column", "First values", "Variable", "Unit", "Bearing reference"].map((h) => (
                <th key={h} scope="col" className="whitespace-nowrap border-b border-line bg-sunken px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-muted">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {draft.choices.map((c, i) => {
              const isTime = i === draft.timeCol || i === draft.timeOfDayCol;
              const isPlatform = i === draft.platformCol;
              const r = c.variable ? resolveVariable(c.variable) : undefined;
              const canonical = r?.canonical as MeasuredVariable | undefined;
              const units = canonical ? allowedUnits(canonical) : [];
              const bearing = canonical ? vocabulary[canonical].convention !== undefined : false;
              const errs = rowProblems(i);
              return (
                <tr key={i} className="align-top" data-testid={`map-row-${i}`}>
                  <th scope="row" className="whitespace-nowrap border-b border-line/70 px-3 py-2 text-left font-semibold">
                    {name(i)}
                  </th>
                  <td className="num max-w-[12rem] truncate border-b border-line/70 px-3 py-2 text-sm text-muted">
                    {rows.slice(0, 3).map((row) => row[i] ?? "").join(" · ")}
                  </td>
                  <td className="border-b border-line/70 px-3 py-2">
                    {isTime ? (
                      <span className="text-sm">Time</span>
                    ) : isPlatform ? (
                      <span className="text-sm">Platform id</span>
                    ) : (
                      <select
                        aria-label={`Variable of ${name(i)}`}
                        className={control}
                        value={c.variable}
                        aria-invalid={errs.some((p) => p.path.endsWith("variable")) || undefined}
                        onChange={(e) => {
                          const v = e.target.value;
                          const rv = v ? resolveVariable(v) : undefined;
                          const keep = rv && allowedUnits(rv.canonical).includes(c.unit);
                          setChoice(i, { variable: v, unit: rv ? (keep ? c.unit : vocabulary[rv.canonical].canonicalUnit) : "" });
                        }}
                      >
                        <option value="">Not used</option>
                        {variableOptions.map((o) => (
                          <option key={o.value} value={o.value}>
                            {o.label}
                          </option>
                        ))}
                      </select>
                    )}
                    {errs.map((p, k) => (
                      <p key={k} className="mt-1 text-sm font-semibold text-signal">
                        ▲ {p.message}
                      </p>
                    ))}
                  </td>
                  <td className="border-b border-line/70 px-3 py-2">
                    {c.variable && !isTime && !isPlatform ? (
                      <select aria-label={`Unit of ${name(i)}`} className={`${control} min-w-[7.5rem]`} value={c.unit} aria-invalid={errs.some((p) => p.path.endsWith("unit")) || undefined} onChange={(e) => setChoice(i, { unit: e.target.value })}>
                        {[...units, ...(units.includes(c.unit) || !c.unit ? [] : [c.unit])].map((u) => (
                          <option key={u} value={u}>
                            {u}
                          </option>
                        ))}
                      </select>
                    ) : null}
                  </td>
                  <td className="border-b border-line/70 px-3 py-2">
                    {bearing && !isTime && !isPlatform ? (
                      <div className="flex items-center gap-2">
                        <select aria-label={`Bearing reference of ${name(i)}`} className={control} value={c.reference} onChange={(e) => setChoice(i, { reference: e.target.value as "true" | "magnetic" })}>
                          <option value="true">True north</option>
                          <option value="magnetic">Magnetic north</option>
                        </select>
                        {c.reference === "magnetic" ? (
                          <input
                            aria-label={`Declination for ${name(i)} in degrees, east positive`}
                            type="number"
                            step="0.1"
                            className={`${control} num w-24`}
                            value={c.declinationDeg}
                            onChange={(e) => setChoice(i, { declinationDeg: Number(e.target.value) || 0 })}
                          />
                        ) : null}
                      </div>
                    ) : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>

      {generalProblems.length ? (
        <Alert tone="attention" title="Fix these before saving or processing">
          <ul className="list-disc pl-5" data-testid="map-problems">
            {generalProblems.map((p, i) => (
              <li key={i}>{p.message}</li>
            ))}
          </ul>
        </Alert>
      ) : checked.ok ? (
        <Alert tone="success">The map is complete: every mapped column has a variable and a fitting unit.</Alert>
      ) : null}

      <div className="flex flex-wrap items-end gap-3">
        <TextField label="Note for this revision (optional)" className="min-w-[18rem] flex-1" value={note} maxLength={500} onChange={(e) => setNote(e.target.value)} />
        <Button variant="secondary" onClick={onSave} disabled={!checked.ok || !platformId} busy={save.isPending}>
          Save map
        </Button>
        {actions?.(checked.ok ? checked.map : null)}
      </div>
      {!platformId ? <p className="text-sm text-muted">This dataset has no deployment, so the map is used for this upload only. To keep it for the next file, choose a deployment under “Edit details” on the dataset page before the first version is built (a drifter fleet can be one drifter platform with a deployment).</p> : null}
      {saveError ? <Alert tone="attention">{saveError}</Alert> : null}

      {history.length ? (
        <details className="rounded-lg border border-line p-3">
          <summary className="cursor-pointer font-semibold">Saved maps of this platform ({history.length})</summary>
          <ul className="mt-2 divide-y divide-line">
            {history.map((h) => (
              <li key={h.id} className="flex flex-wrap items-center justify-between gap-2 py-2 text-sm">
                <span>
                  Revision <span className="num">{h.revision}</span> by {h.createdByName ?? "—"}, <UtcTime iso={h.createdAt} />
                  {h.note ? <> — {h.note}</> : null}
                </span>
                <Button
                  size="sm"
                  variant="ghost"
                  onClick={() => {
                    setDraft(toDraft(h.map as ColumnMapInput, header, width));
                    setLoadedFrom(`revision ${h.revision}`);
                    setShownNotes([]);
                  }}
                >
                  Use revision {h.revision}
                </Button>
              </li>
            ))}
          </ul>
        </details>
      ) : null}
    </div>
  );
}
