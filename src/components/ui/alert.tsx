import clsx from "clsx";
import type { ReactNode } from "react";

/** A boxed message. "attention" uses the warm signal colour plus a glyph, never colour alone. */
export function Alert({ tone = "info", title, children, className }: { tone?: "info" | "attention" | "success"; title?: ReactNode; children?: ReactNode; className?: string }) {
  return (
    <div
      role={tone === "attention" ? "alert" : "status"}
      className={clsx(
        "flex gap-3 rounded-md border px-4 py-3",
        tone === "attention" && "border-signal bg-signal-soft",
        tone === "info" && "border-line bg-sunken",
        tone === "success" && "border-ok bg-surface",
        className,
      )}
    >
      <span aria-hidden className={clsx("mt-0.5 font-bold", tone === "attention" ? "text-signal" : tone === "success" ? "text-ok" : "text-accent")}>
        {tone === "attention" ? "▲" : tone === "success" ? "✓" : "ℹ"}
      </span>
      <div className="min-w-0 space-y-1">
        {title ? <p className="font-semibold">{title}</p> : null}
        {children ? <div className="text-[0.95rem]">{children}</div> : null}
      </div>
    </div>
  );
}
