import { useEffect } from "react";

/** Each page names itself in the browser tab and history: "Catalogue · Tauline". */
export function useDocumentTitle(title: unknown) {
  useEffect(() => {
    if (typeof title === "string" && title) document.title = `${title} · Tauline`;
  }, [title]);
}
