import type { FindingView } from "@shared/schemas/uploads";

/** Problems found in a file, errors first; each names its lines and column. */
export function FindingsList({ findings }: { findings: FindingView[] }) {
  const sorted = [...findings].sort((a, b) => (a.severity === b.severity ? 0 : a.severity === "error" ? -1 : 1));
  return (
    <ul className="space-y-2" data-testid="findings">
      {sorted.map((f, i) => (
        <li key={i} className="flex gap-2 text-[0.95rem]">
          <span aria-hidden className={f.severity === "error" ? "font-bold text-signal" : "font-bold text-flag-suspect"}>
            {f.severity === "error" ? "▲" : "△"}
          </span>
          <span>
            <span className="font-semibold">{f.severity === "error" ? "Blocks processing: " : "Warning: "}</span>
            {f.message}
          </span>
        </li>
      ))}
    </ul>
  );
}
