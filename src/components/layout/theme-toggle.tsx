import { useEffect, useState } from "react";
import { applyTheme, readThemeChoice, saveThemeChoice, type ThemeChoice } from "@/lib/theme";

const order: ThemeChoice[] = ["system", "light", "dark"];
const words: Record<ThemeChoice, string> = { system: "Auto", light: "Light", dark: "Dark" };

/** Cycles auto → light → dark; auto follows the system setting. */
export function ThemeToggle() {
  const [choice, setChoice] = useState<ThemeChoice>(readThemeChoice);

  useEffect(() => {
    if (choice !== "system") return;
    const mq = window.matchMedia("(prefers-color-scheme: dark)");
    const on = () => applyTheme("system");
    mq.addEventListener("change", on);
    return () => mq.removeEventListener("change", on);
  }, [choice]);

  const next = order[(order.indexOf(choice) + 1) % order.length];
  return (
    <button
      type="button"
      onClick={() => {
        saveThemeChoice(next);
        setChoice(next);
      }}
      className="inline-flex items-center gap-1.5 rounded-md border border-field px-2 py-1 text-sm text-fg hover:bg-sunken"
      aria-label={`Colour theme: ${words[choice]}. Switch to ${words[next]}`}
      title={`Colour theme: ${words[choice]}`}
    >
      <svg aria-hidden viewBox="0 0 16 16" className="size-4">
        <circle cx="8" cy="8" r="6" fill="none" stroke="currentColor" strokeWidth="1.5" />
        {choice === "light" ? null : <path d="M8 2a6 6 0 0 1 0 12z" fill="currentColor" />}
        {choice === "system" ? <path d="M8 2a6 6 0 0 0 0 12z" fill="currentColor" opacity="0.25" /> : null}
      </svg>
      <span className="hidden sm:inline">Theme: {words[choice]}</span>
    </button>
  );
}
