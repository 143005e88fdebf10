import type { PlatformKind } from "@shared/schemas/platforms";

/** Platform type as glyph + word: a moored float, or a drifting float with its drogue. */
export function KindLabel({ kind }: { kind: PlatformKind | null | undefined }) {
  if (!kind) return <span className="text-muted">—</span>;
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap">
      <svg aria-hidden viewBox="0 0 16 16" className="size-4 text-accent">
        {kind === "mooring" ? (
          <>
            <circle cx="8" cy="4" r="2.6" fill="currentColor" />
            <path d="M8 6.5V14M5 14h6" stroke="currentColor" strokeWidth="1.5" fill="none" strokeLinecap="round" />
          </>
        ) : (
          <>
            <circle cx="5" cy="5" r="2.6" fill="currentColor" />
            <path d="M6.5 7 10 11" stroke="currentColor" strokeWidth="1.3" strokeDasharray="1.6 1.2" />
            <rect x="9.5" y="10.5" width="4" height="3" rx="0.6" fill="none" stroke="currentColor" strokeWidth="1.3" />
          </>
        )}
      </svg>
      {kind}
    </span>
  );
}
