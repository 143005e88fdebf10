import { formatUtc } from "@/lib/format";

/** A time shown in UTC with the zone written, machine-readable in `dateTime`. */
export function UtcTime({ iso, seconds }: { iso: string | null | undefined; seconds?: boolean }) {
  if (!iso) return <span className="text-muted">—</span>;
  return (
    <time dateTime={iso} className="num whitespace-nowrap">
      {formatUtc(iso, seconds)}
    </time>
  );
}
