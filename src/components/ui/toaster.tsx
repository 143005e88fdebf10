import clsx from "clsx";
import { useEffect, useState } from "react";
import { dismissToast, subscribeToasts, type Toast } from "@/lib/toast";

export function Toaster() {
  const [toasts, setToasts] = useState<Toast[]>([]);
  useEffect(() => subscribeToasts(setToasts), []);
  return (
    // Top right under the header on wide screens, clear of the buttons that end most forms.
    <div aria-live="polite" className="pointer-events-none fixed inset-x-0 bottom-3 z-50 flex flex-col items-center gap-2 px-3 lg:inset-x-auto lg:bottom-auto lg:right-4 lg:top-[4.5rem] lg:items-end lg:px-0">
      {toasts.map((t) => (
        <div
          key={t.id}
          role={t.tone === "error" ? "alert" : "status"}
          className={clsx(
            "pointer-events-auto flex max-w-lg items-start gap-3 rounded-md border bg-surface px-4 py-2.5 shadow-lg lg:max-w-sm",
            t.tone === "error" ? "border-signal" : "border-line",
          )}
        >
          <span aria-hidden className={t.tone === "error" ? "text-signal" : "text-ok"}>
            {t.tone === "error" ? "▲" : "✓"}
          </span>
          <span className="text-[0.95rem]">{t.text}</span>
          <button type="button" className="ml-2 text-sm text-muted underline" onClick={() => dismissToast(t.id)}>
            Dismiss
          </button>
        </div>
      ))}
    </div>
  );
}
