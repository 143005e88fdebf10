import clsx from "clsx";

/** Tauline's mark: a surface float on a swell line, its taut line down to the anchor. */
export function LogoMark({ className }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" aria-hidden className={clsx("shrink-0", className)}>
      <rect width="32" height="32" rx="7" className="fill-[#0c2a3e] dark:fill-[#123650]" />
      <path d="M3 12c3.2 0 3.2-2 6.5-2s3.2 2 6.5 2 3.2-2 6.5-2 3.2 2 6.5 2" fill="none" stroke="#d8ece8" strokeWidth="2" strokeLinecap="round" />
      <circle cx="16" cy="9" r="3.4" fill="#f0a04b" />
      <path d="M16 12.5V25" stroke="#d8ece8" strokeWidth="1.8" />
      <path d="M11.5 25h9" stroke="#d8ece8" strokeWidth="2.4" strokeLinecap="round" />
    </svg>
  );
}

export function Wordmark({ className }: { className?: string }) {
  return (
    <span className={clsx("inline-flex items-center gap-2", className)}>
      <LogoMark className="size-8" />
      <span className="text-xl font-bold tracking-tight">
        Tau<span className="font-semibold text-accent">line</span>
      </span>
    </span>
  );
}
