import { useState } from "react";
import type { Annotation, AnnotationResult } from "@shared/schemas/annotations";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { FlagBadge, type QcFlag } from "@/components/ui/flag-badge";
import { ApiError, getErrorMessage } from "@/lib/api-client";
import { isoToUtcInput } from "@/lib/format";
import { useCreateAnnotation, useUpdateAnnotation } from "../api/annotations";

function utcToIso(s: string): string | null {
  const m = /^(\d{4}-\d{2}-\d{2})[ T](\d{2}:\d{2})(:\d{2})?\s*(UTC|Z)?$/i.exec(s.trim());
  if (!m) return null;
  const d = new Date(`${m[1]}T${m[2]}${m[3] ?? ":00"}Z`);
  return Number.isNaN(d.getTime()) ? null : d.toISOString();
}

/**
 * Note a stretch, and optionally flag it by hand. A manual flag needs a reason; it wins over the automatic flags of
 * the chosen variables in the version being prepared and in every later version.
 */
export function AnnotationForm({
  datasetId,
  versionId,
  variables,
  labels,
  initial,
  editing,
  onDone,
  onCancel,
}: {
  datasetId: string;
  versionId: string;
  variables: string[];
  labels: Record<string, { label: string; unit: string }>;
  initial: { from: string; to: string; variables: string[] };
  editing?: Annotation;
  onDone: (r: AnnotationResult) => void;
  onCancel: () => void;
}) {
  const [from, setFrom] = useState(isoToUtcInput(editing?.from ?? initial.from));
  const [to, setTo] = useState(isoToUtcInput(editing?.to ?? initial.to));
  const [chosen, setChosen] = useState<string[]>(editing?.variables ?? initial.variables);
  const [note, setNote] = useState(editing?.note ?? "");
  const [flag, setFlag] = useState<string>(editing?.flag ? String(editing.flag) : "");
  const [reason, setReason] = useState(editing?.reason ?? "");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const create = useCreateAnnotation(datasetId);
  const update = useUpdateAnnotation(datasetId);
  const busy = create.isPending || update.isPending;
  const failure = create.error ?? update.error;

  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    const err: Record<string, string> = {};
    const a = utcToIso(from);
    const b = utcToIso(to);
    if (!a) err.from = "Write the start as 2026-10-01 06:00 (UTC).";
    if (!b) err.to = "Write the end as 2026-10-01 08:00 (UTC).";
    if (a && b && b < a) err.to = "The end is before the start.";
    if (!chosen.length) err.variables = "Choose at least one variable.";
    if (flag && reason.trim().length < 3) err.reason = "Say why you flag this stretch (at least 3 characters).";
    if (!flag && !note.trim()) err.note = "Write a note, or choose a flag.";
    setErrors(err);
    if (Object.keys(err).length) return;
    const body = { from: a!, to: b!, variables: chosen, note: note.trim(), flag: flag ? (Number(flag) as 1 | 3 | 4) : null, reason: flag ? reason.trim() : undefined };
    const handle = {
      onSuccess: onDone,
      onError: (x: Error) => {
        if (x instanceof ApiError) setErrors(Object.fromEntries(Object.entries(x.fields).map(([k, v]) => [k, v[0] ?? ""])));
      },
    };
    if (editing) update.mutate({ id: editing.id, input: body }, handle);
    else create.mutate({ ...body, versionId }, handle);
  };

  const field = "rounded-md border border-field bg-surface px-2 py-1";
  return (
    <form onSubmit={submit} className="space-y-3 rounded-lg border-2 border-signal bg-surface p-4" aria-label={editing ? "Edit annotation" : "Annotate a stretch"} data-testid="annotation-form">
      <h3 className="font-semibold">{editing ? "Edit annotation" : "Annotate this stretch"}</h3>
      <div className="flex flex-wrap gap-3">
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-semibold">From (UTC)</span>
          <input className={`num ${field}`} value={from} onChange={(e) => setFrom(e.target.value)} aria-invalid={!!errors.from} data-testid="annotation-from" autoFocus />
          {errors.from ? <span className="text-signal">{errors.from}</span> : null}
        </label>
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-semibold">To (UTC)</span>
          <input className={`num ${field}`} value={to} onChange={(e) => setTo(e.target.value)} aria-invalid={!!errors.to} data-testid="annotation-to" />
          {errors.to ? <span className="text-signal">{errors.to}</span> : null}
        </label>
      </div>
      <fieldset className="text-sm">
        <legend className="mb-1 font-semibold">Variables</legend>
        <div className="flex flex-wrap gap-x-4 gap-y-1">
          {variables.map((v) => (
            <label key={v} className="inline-flex items-center gap-1">
              <input type="checkbox" checked={chosen.includes(v)} onChange={() => setChosen(chosen.includes(v) ? chosen.filter((x) => x !== v) : [...chosen, v])} />
              {labels[v]?.label ?? v}
            </label>
          ))}
        </div>
        {errors.variables ? <p className="text-signal">{errors.variables}</p> : null}
      </fieldset>
      <label className="flex flex-col gap-1 text-sm">
        <span className="font-semibold">Note</span>
        <textarea className={field} rows={2} value={note} onChange={(e) => setNote(e.target.value)} placeholder="What happened here, e.g. ship alongside for servicing" />
        {errors.note ? <span className="text-signal">{errors.note}</span> : null}
      </label>
      <fieldset className="text-sm">
        <legend className="mb-1 font-semibold">Manual flag</legend>
        <div className="flex flex-wrap gap-4">
          {[
            ["", null],
            ["3", 3],
            ["4", 4],
            ["1", 1],
          ].map(([value, f]) => (
            <label key={String(value)} className="inline-flex items-center gap-1.5">
              <input type="radio" name="manual-flag" value={String(value)} checked={flag === value} onChange={() => setFlag(String(value))} data-testid={`flag-${value || "none"}`} />
              {f ? <FlagBadge flag={f as QcFlag} /> : "No flag, note only"}
            </label>
          ))}
        </div>
      </fieldset>
      {flag ? (
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-semibold">Reason for the flag (required)</span>
          <input className={field} value={reason} onChange={(e) => setReason(e.target.value)} aria-invalid={!!errors.reason} placeholder="e.g. anemometer iced, seen on the buoy camera" data-testid="annotation-reason" />
          {errors.reason ? <span className="text-signal">{errors.reason}</span> : null}
          <span className="text-muted">A manual flag wins over the automatic ones for these variables; derived values take it on. Released versions never change: it applies to the version being prepared and to later ones.</span>
        </label>
      ) : null}
      {failure && !(failure instanceof ApiError && Object.keys(failure.fields).length) ? <Alert tone="attention">{getErrorMessage(failure)}</Alert> : null}
      <div className="flex gap-2">
        <Button type="submit" busy={busy} data-testid="annotation-save">
          {editing ? "Save changes" : flag ? "Save and flag" : "Save note"}
        </Button>
        <Button variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
