/** Times are always shown in UTC with the zone written: "2026-03-05 12:00 UTC". */
export function formatUtc(iso: string | null | undefined, withSeconds = false): string {
  if (!iso) return "—";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const s = d.toISOString();
  return `${s.slice(0, 10)} ${s.slice(11, withSeconds ? 19 : 16)} UTC`;
}

export function formatUtcDate(iso: string | null | undefined): string {
  if (!iso) return "—";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toISOString().slice(0, 10);
}

/** A fixed number of decimals with a true minus sign; "—" for missing. */
export function formatNumber(v: number | null | undefined, decimals = 1): string {
  if (v === null || v === undefined || Number.isNaN(v)) return "—";
  return v.toFixed(decimals).replace(/^-/, "−");
}

/** Latitude/longitude in decimal degrees with hemisphere letters: "57.412° N". */
export function formatLat(v: number | null | undefined): string {
  if (v === null || v === undefined) return "—";
  return `${Math.abs(v).toFixed(3)}° ${v >= 0 ? "N" : "S"}`;
}
export function formatLon(v: number | null | undefined): string {
  if (v === null || v === undefined) return "—";
  return `${Math.abs(v).toFixed(3)}° ${v >= 0 ? "E" : "W"}`;
}

/** "2026-03-05T12:00:00Z" → "2026-03-05T12:00" for a datetime-local input read as UTC. */
export function isoToUtcInput(iso: string | null | undefined): string {
  if (!iso) return "";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return "";
  return d.toISOString().slice(0, 16);
}

/** The reverse: a UTC wall-clock value from a datetime-local input → ISO 8601 with Z. */
export function utcInputToIso(v: string): string {
  const t = v.trim();
  if (!t) return "";
  if (/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/.test(t)) return `${t}:00Z`;
  if (/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?$/.test(t)) return `${t}Z`;
  return t;
}
