import { useState } from "react";
import { useNavigate } from "react-router-dom";
import { licences } from "@shared/schemas/datasets";
import type { VersionReview } from "@shared/schemas/curation";
import { paths } from "@/config/paths";
import { ApiError, getErrorMessage } from "@/lib/api-client";
import { showToast } from "@/lib/toast";
import { Button } from "@/components/ui/button";
import { SelectField, TextareaField, TextField } from "@/components/ui/field";
import { Panel } from "@/components/ui/section";
import { useReleaseVersion, useRetractVersion } from "../api/releases";

/** Curators release an approved version: licence, notes and (optionally) the author list for the citation. */
export function ReleasePanel({ review, defaultLicence = "CC-BY-4.0" }: { review: VersionReview; defaultLicence?: string }) {
  const release = useReleaseVersion(review.version.id);
  const navigate = useNavigate();
  const [licence, setLicence] = useState(defaultLicence);
  const [notes, setNotes] = useState("");
  const [authors, setAuthors] = useState("");
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  return (
    <Panel>
      <h2 className="mb-1 text-lg font-semibold">Release version {review.version.number}</h2>
      <p className="mb-3 text-sm text-muted">
        A release is permanent: its citation, licence and file checksums never change. It replaces the dataset's current release, which stays citable as
        superseded. Members and followers are told.
      </p>
      <form
        className="space-y-3"
        onSubmit={(e) => {
          e.preventDefault();
          const names = authors
            .split(/\n|;/)
            .map((a) => a.trim())
            .filter(Boolean);
          release.mutate(
            { licence: licence as (typeof licences)[number], notes: notes || undefined, authors: names.length ? names : undefined },
            {
              onSuccess: (r) => {
                showToast(`Released as release ${r.releaseNumber}.`, "success");
                navigate(paths.release(r.id));
              },
              onError: (err) => {
                if (err instanceof ApiError && Object.keys(err.fields).length) setErrors(err.fields);
                else showToast(getErrorMessage(err), "error");
              },
            },
          );
        }}
      >
        <SelectField label="Licence" value={licence} onChange={(e) => setLicence(e.target.value)} options={licences.map((l) => ({ value: l, label: l }))} error={errors.licence?.[0]} />
        <TextareaField label="Release notes (optional)" hint="What changed since the last release, known limitations." value={notes} onChange={(e) => setNotes(e.target.value)} rows={3} error={errors.notes?.[0]} />
        <TextField
          label="Authors (optional)"
          hint="Separate names with semicolons. Left empty: whoever built and uploaded the version, then the project's curators."
          value={authors}
          onChange={(e) => setAuthors(e.target.value)}
          error={errors.authors?.[0]}
        />
        <Button type="submit" busy={release.isPending} disabled={release.isPending}>
          Release version {review.version.number}
        </Button>
      </form>
    </Panel>
  );
}

/** Retracting leaves a tombstone with the reason; the data then stays visible to project members only. */
export function RetractPanel({ versionId, onDone }: { versionId: string; onDone?: () => void }) {
  const retract = useRetractVersion(versionId);
  const [open, setOpen] = useState(false);
  const [reason, setReason] = useState("");
  const [error, setError] = useState<string>();
  if (!open) {
    return (
      <Button variant="attention" onClick={() => setOpen(true)}>
        Retract this release…
      </Button>
    );
  }
  return (
    <Panel className="border-signal">
      <h2 className="mb-1 text-lg font-semibold">Retract the release</h2>
      <p className="mb-3 text-sm text-muted">
        The release page becomes a tombstone showing your reason, the citation and the checksums. Visitors can no longer get the data. This cannot be undone.
      </p>
      <form
        className="space-y-3"
        onSubmit={(e) => {
          e.preventDefault();
          if (reason.trim().length < 3) {
            setError("Give a reason of at least 3 characters");
            return;
          }
          retract.mutate(reason, {
            onSuccess: () => {
              showToast("Release retracted. Members and followers have been told.", "success");
              setOpen(false);
              onDone?.();
            },
            onError: (err) => setError(err instanceof ApiError && err.fields.reason ? err.fields.reason[0] : getErrorMessage(err)),
          });
        }}
      >
        <TextareaField label="Reason (required, shown publicly)" value={reason} onChange={(e) => setReason(e.target.value)} rows={3} error={error} />
        <div className="flex gap-2">
          <Button type="submit" variant="attention" busy={retract.isPending} disabled={retract.isPending}>
            Retract release
          </Button>
          <Button variant="secondary" onClick={() => setOpen(false)}>
            Cancel
          </Button>
        </div>
      </form>
    </Panel>
  );
}
