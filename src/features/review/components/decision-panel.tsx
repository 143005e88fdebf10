import { useId, useState } from "react";
import type { VersionReview } from "@shared/schemas/curation";
import { ApiError, getErrorMessage } from "@/lib/api-client";
import { showToast } from "@/lib/toast";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextareaField } from "@/components/ui/field";
import { Panel } from "@/components/ui/section";
import { useVersionAction, type ReviewAction } from "../api/decide-version";

type Decision = "approve" | "request-changes" | "reject";

const choices: { value: Decision; label: string; hint: string }[] = [
  { value: "approve", label: "Approve", hint: "Ready to release. A note is optional." },
  { value: "request-changes", label: "Request changes", hint: "The contributor rebuilds and submits again. Say what to change." },
  { value: "reject", label: "Reject", hint: "This version will not be released. Say why." },
];

const doneWords: Record<ReviewAction, string> = {
  submit: "Submitted for review. The project's curators have been told.",
  approve: "Approved. The uploader has been told; a curator can now release it.",
  "request-changes": "Changes requested. The uploader has been told.",
  reject: "Rejected. The uploader has been told.",
};

/** Submit (contributors) or decide (curators who did not build or upload the version), with the reason the server requires. */
export function DecisionPanel({ review }: { review: VersionReview }) {
  const p = review.permissions;
  const action = useVersionAction(review.version.id);
  const [decision, setDecision] = useState<Decision | null>(null);
  const [text, setText] = useState("");
  const [fieldError, setFieldError] = useState<string | undefined>();
  const groupId = useId();

  const run = (a: ReviewAction) => {
    setFieldError(undefined);
    action.mutate(a === "submit" ? { action: a, note: text } : { action: a, reason: text }, {
      onSuccess: () => {
        setText("");
        setDecision(null);
        showToast(doneWords[a], "success");
      },
      onError: (e) => {
        if (e instanceof ApiError && e.fields.reason) setFieldError(e.fields.reason[0]);
        else if (e instanceof ApiError && e.fields.note) setFieldError(e.fields.note[0]);
        else showToast(getErrorMessage(e), "error");
      },
    });
  };

  if (p.canDecide) {
    const needsReason = decision === "reject" || decision === "request-changes";
    return (
      <Panel>
        <h2 className="mb-1 text-lg font-semibold">Your decision</h2>
        <p className="mb-3 text-sm text-muted">The uploader gets an e-mail and an in-app notice with your reason.</p>
        <form
          onSubmit={(e) => {
            e.preventDefault();
            if (!decision) {
              setFieldError("Choose a decision");
              return;
            }
            if (needsReason && text.trim().length < 3) {
              setFieldError("Give a reason of at least 3 characters");
              return;
            }
            run(decision);
          }}
          className="space-y-3"
        >
          <fieldset aria-describedby={`${groupId}-hint`}>
            <legend className="mb-1 text-sm font-semibold">Decision</legend>
            <div className="grid gap-2">
              {choices.map((c) => (
                <label key={c.value} className="flex cursor-pointer items-start gap-2 rounded-md border border-line px-3 py-2 has-[:checked]:border-accent has-[:checked]:bg-sunken">
                  <input
                    type="radio"
                    name="decision"
                    value={c.value}
                    checked={decision === c.value}
                    onChange={() => {
                      setDecision(c.value);
                      setFieldError(undefined);
                    }}
                    className="mt-1"
                  />
                  <span>
                    <span className="font-semibold">{c.label}</span>
                    <span className="block text-sm text-muted">{c.hint}</span>
                  </span>
                </label>
              ))}
            </div>
          </fieldset>
          <TextareaField
            label={needsReason ? "Reason (required)" : "Note (optional)"}
            hint={needsReason ? "Name the stretch, variable or setting, so the contributor can act on it." : undefined}
            value={text}
            onChange={(e) => setText(e.target.value)}
            rows={4}
            error={fieldError}
            maxLength={4000}
          />
          <Button type="submit" busy={action.isPending} disabled={action.isPending} variant={decision === "reject" ? "attention" : "primary"}>
            {decision ? `${choices.find((c) => c.value === decision)!.label}` : "Record decision"}
          </Button>
        </form>
      </Panel>
    );
  }

  if (p.fourEyesBlocked) {
    return (
      <Alert tone="info" title="Another curator reviews this version">
        You uploaded or built this version, so under the four-eyes rule a different curator of {review.version.projectName} must approve or reject it.
      </Alert>
    );
  }

  if (p.canSubmit) {
    const again = review.version.state === "changes_requested";
    return (
      <Panel>
        <h2 className="mb-1 text-lg font-semibold">{again ? "Submit again" : "Submit for review"}</h2>
        <p className="mb-3 text-sm text-muted">
          {again
            ? "A curator asked for changes. Submit again once the version has been rebuilt with them."
            : "The project's curators are told and one of them, not you, approves or rejects it."}
        </p>
        <form
          onSubmit={(e) => {
            e.preventDefault();
            run("submit");
          }}
          className="space-y-3"
        >
          <TextareaField label="Note for the reviewer (optional)" value={text} onChange={(e) => setText(e.target.value)} rows={3} error={fieldError} maxLength={4000} />
          <Button type="submit" busy={action.isPending} disabled={action.isPending}>
            Submit version {review.version.number}
          </Button>
        </form>
      </Panel>
    );
  }

  const waiting: Partial<Record<VersionReview["version"]["state"], string>> = {
    in_review: "Waiting for a curator's decision.",
    approved: "Approved. A curator can release it.",
    rejected: "Rejected. Build a new version from a corrected upload.",
    changes_requested: "A curator asked for changes; a contributor rebuilds and submits again.",
    draft: "Not processed yet.",
    processing: "Processing; it can be submitted once it is ready.",
    failed: "Processing failed; fix the upload or column map and build again.",
  };
  const msg = waiting[review.version.state];
  // The latest decision's reason, so the uploader reads what to fix without scanning the history.
  const last = [...review.history].reverse().find((h) => h.toState === review.version.state && h.reason);
  if (!msg) return null;
  const attention = review.version.state === "rejected" || review.version.state === "changes_requested";
  return (
    <Alert tone={attention ? "attention" : "info"} title={msg}>
      {last ? (
        <p className="whitespace-pre-line" data-testid="decision-reason">
          {last.actorName ?? "A curator"}: “{last.reason}”
        </p>
      ) : null}
    </Alert>
  );
}
