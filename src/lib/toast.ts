/** A tiny store for short notices; the Toaster component renders it. */
export type Toast = { id: number; tone: "info" | "success" | "error"; text: string };

type Listener = (toasts: Toast[]) => void;
let toasts: Toast[] = [];
let nextId = 1;
const listeners = new Set<Listener>();

function emit() {
  for (const l of listeners) l(toasts);
}

export function showToast(text: string, tone: Toast["tone"] = "info", ms = 6000) {
  const id = nextId++;
  toasts = [...toasts, { id, tone, text }].slice(-4);
  emit();
  window.setTimeout(() => dismissToast(id), ms);
}

export function dismissToast(id: number) {
  toasts = toasts.filter((t) => t.id !== id);
  emit();
}

export function subscribeToasts(l: Listener): () => void {
  listeners.add(l);
  l(toasts);
  return () => listeners.delete(l);
}
