import clsx from "clsx";

/** QC flag scheme (open real-time QC manuals): 1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing. */
export type QcFlag = 1 | 2 | 3 | 4 | 9;

export const qcFlagWords: Record<QcFlag, string> = {
  1: "pass",
  2: "not evaluated",
  3: "suspect",
  4: "fail",
  9: "missing",
};

const colour: Record<QcFlag, string> = {
  1: "text-flag-pass",
  2: "text-flag-ne",
  3: "text-flag-suspect",
  4: "text-flag-fail",
  9: "text-flag-missing",
};

/** Each flag has its own shape, so flags read in grey-scale and without colour vision. */
export function FlagGlyph({ flag, className }: { flag: QcFlag; className?: string }) {
  return (
    <svg aria-hidden viewBox="0 0 12 12" className={clsx("size-3 shrink-0", colour[flag], className)}>
      {flag === 1 && <circle cx="6" cy="6" r="4.5" fill="currentColor" />}
      {flag === 2 && <circle cx="6" cy="6" r="4" fill="none" stroke="currentColor" strokeWidth="1.6" />}
      {flag === 3 && <path d="M6 1.2 11 10.5H1z" fill="currentColor" />}
      {flag === 4 && <path d="M2 2 10 10M10 2 2 10" stroke="currentColor" strokeWidth="2.6" strokeLinecap="round" />}
      {flag === 9 && <rect x="1.8" y="1.8" width="8.4" height="8.4" fill="none" stroke="currentColor" strokeWidth="1.4" strokeDasharray="2 1.4" />}
    </svg>
  );
}

/** A QC flag as glyph + word (+ number on request). Use wherever a flag is shown. */
export function FlagBadge({ flag, showCode, className }: { flag: QcFlag; showCode?: boolean; className?: string }) {
  return (
    <span
      className={clsx("inline-flex items-center gap-1 whitespace-nowrap rounded border border-line bg-surface px-1.5 py-px text-xs font-semibold", className)}
      title={`QC flag ${flag}: ${qcFlagWords[flag]}`}
    >
      <FlagGlyph flag={flag} />
      <span>{qcFlagWords[flag]}</span>
      {showCode ? <span className="num text-muted">{flag}</span> : null}
    </span>
  );
}

/** The full scheme as a legend. */
export function FlagLegend() {
  return (
    <ul aria-label="QC flags" className="flex flex-wrap gap-2">
      {([1, 2, 3, 4, 9] as QcFlag[]).map((f) => (
        <li key={f}>
          <FlagBadge flag={f} showCode />
        </li>
      ))}
    </ul>
  );
}
