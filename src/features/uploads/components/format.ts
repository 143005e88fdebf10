/** File sizes in SI units with the number in the tabular face: "251.3 MB". */
export function formatBytes(n: number): string {
  if (n < 1000) return `${n} B`;
  const [v, u] = n >= 1e9 ? [n / 1e9, "GB"] : n >= 1e6 ? [n / 1e6, "MB"] : [n / 1e3, "kB"];
  return `${v.toFixed(v < 10 ? 2 : 1)} ${u}`;
}

/** The sentence a tus error carries (server messages are one line in the response text). */
export function tusErrorMessage(err: unknown): string {
  const text = err instanceof Error ? err.message : String(err);
  const m = /response text: ([\s\S]*?)(?:, request id:|$)/.exec(text);
  const body = m?.[1]?.trim();
  if (body) return body;
  if (/failed to upload|network|ECONN|Failed to fetch/i.test(text)) return "The connection to Tauline was lost. The upload resumes when you retry or pick the same file again.";
  return text;
}

const delimiterWords: Record<string, string> = { ",": "comma", ";": "semicolon", "\t": "tab", " ": "spaces" };
export const describeDelimiter = (d: string) => delimiterWords[d] ?? JSON.stringify(d);
