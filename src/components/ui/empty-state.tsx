import type { ReactNode } from "react";

/** Shown when a list is empty: say what it will hold and what to do next. */
export function EmptyState({ title, children, action }: { title: string; children?: ReactNode; action?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-line bg-surface px-5 py-8 text-center">
      <svg aria-hidden viewBox="0 0 64 24" className="mx-auto mb-3 h-6 w-16 text-muted">
        <path d="M2 12c5 0 5-5 10-5s5 5 10 5 5-5 10-5 5 5 10 5 5-5 10-5 5 5 10 5" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
      </svg>
      <h3 className="text-lg font-semibold">{title}</h3>
      {children ? <div className="mx-auto mt-1 max-w-prose text-muted">{children}</div> : null}
      {action ? <div className="mt-4 flex justify-center gap-2">{action}</div> : null}
    </div>
  );
}
