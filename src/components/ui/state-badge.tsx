import clsx from "clsx";
import type { VersionState } from "@shared/schemas/datasets";

const words: Record<VersionState, string> = {
  draft: "draft",
  processing: "processing",
  ready: "ready",
  failed: "failed",
  in_review: "in review",
  changes_requested: "changes requested",
  rejected: "rejected",
  approved: "approved",
  released: "released",
  superseded: "superseded",
  retracted: "retracted",
};

const needsAttention = new Set<VersionState>(["failed", "changes_requested", "rejected"]);

/** Version state as a word; states that need someone's attention also carry the signal glyph. */
export function StateBadge({ state }: { state: VersionState }) {
  const warn = needsAttention.has(state);
  return (
    <span
      className={clsx(
        "inline-flex items-center gap-1 whitespace-nowrap rounded-full border px-2 py-px text-xs font-semibold",
        warn && "border-signal bg-signal-soft text-signal",
        state === "released" && "border-ok text-ok",
        !warn && state !== "released" && "border-line text-muted",
      )}
    >
      {warn ? <span aria-hidden>▲</span> : state === "released" ? <span aria-hidden>◆</span> : null}
      {words[state]}
    </span>
  );
}

export function RoleBadge({ role }: { role: string }) {
  return <span className="inline-flex rounded-full border border-line px-2 py-px text-xs font-semibold text-muted">{role}</span>;
}
