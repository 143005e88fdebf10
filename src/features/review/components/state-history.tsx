import type { HistoryEntry } from "@shared/schemas/curation";
import type { VersionState } from "@shared/schemas/datasets";
import { StateBadge } from "@/components/ui/state-badge";
import { UtcTime } from "@/components/ui/utc-time";

const actionWords: Record<string, string> = {
  "version.built": "Processing finished",
  "version.submit": "Submitted for review",
  "version.approve": "Approved",
  "version.reject": "Rejected",
  "version.request_changes": "Changes requested",
  "version.release": "Released",
  "version.supersede": "Superseded by a newer release",
  "version.retract": "Retracted",
};

/** Who moved the version, when, from which state to which, and why — read from the audit log. */
export function StateHistory({ entries }: { entries: HistoryEntry[] }) {
  if (!entries.length) return <p className="text-muted">No state changes recorded yet.</p>;
  return (
    <ol className="relative space-y-3 border-l border-line pl-4" aria-label="State history">
      {entries.map((h, i) => (
        <li key={i} className="relative">
          <span aria-hidden className="absolute -left-[1.3rem] top-1.5 size-2.5 rounded-full border-2 border-accent bg-surface" />
          <div className="flex flex-wrap items-center gap-x-2 gap-y-1">
            <span className="font-semibold">{actionWords[h.action] ?? h.action}</span>
            {h.fromState && h.toState ? (
              <span className="inline-flex items-center gap-1 text-sm">
                <StateBadge state={h.fromState as VersionState} /> <span aria-label="to">→</span> <StateBadge state={h.toState as VersionState} />
              </span>
            ) : null}
          </div>
          <div className="text-sm text-muted">
            <UtcTime iso={h.at} /> · {h.actorName ?? "Tauline (automatic)"}
          </div>
          {h.reason ? <p className="mt-1 whitespace-pre-line text-[0.95rem]">“{h.reason}”</p> : null}
        </li>
      ))}
    </ol>
  );
}
