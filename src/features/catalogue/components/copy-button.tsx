import { showToast } from "@/lib/toast";
import { Button } from "@/components/ui/button";

/** Copies text to the clipboard and says so. */
export function CopyButton({ text, label = "Copy", what }: { text: string; label?: string; what: string }) {
  return (
    <Button
      type="button"
      variant="secondary"
      size="sm"
      onClick={() => {
        navigator.clipboard.writeText(text).then(
          () => showToast(`${what} copied.`, "success"),
          () => showToast(`Could not copy; select the ${what.toLowerCase()} and copy it by hand.`, "error"),
        );
      }}
    >
      {label}
    </Button>
  );
}
