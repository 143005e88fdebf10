import { clsx } from "clsx";
import { Button } from "./button";

/** The submit and cancel row every create/edit form ends with; the submit button shows progress while saving. */
export function FormActions({ submitLabel, busy, onCancel, className }: { submitLabel: string; busy: boolean; onCancel: () => void; className?: string }) {
  return (
    <div className={clsx("flex gap-2", className)}>
      <Button type="submit" busy={busy} disabled={busy}>
        {submitLabel}
      </Button>
      <Button variant="secondary" onClick={onCancel}>
        Cancel
      </Button>
    </div>
  );
}
