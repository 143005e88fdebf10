import { useEffect, useState } from "react";
import type { PlatformKind } from "@shared/schemas/platforms";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";

/** Search box + platform-type filter; submits on Enter and when the type changes. */
export function CatalogueSearch({ q, kind, onChange }: { q: string; kind: string; onChange: (next: { q: string; kind: PlatformKind | "" }) => void }) {
  const [text, setText] = useState(q);
  useEffect(() => setText(q), [q]);
  return (
    <form
      role="search"
      className="flex flex-col gap-3 rounded-lg border border-line bg-surface p-4 sm:flex-row sm:items-end"
      onSubmit={(e) => {
        e.preventDefault();
        onChange({ q: text.trim(), kind: kind as PlatformKind | "" });
      }}
    >
      <TextField
        className="flex-1"
        label="Search released datasets"
        type="search"
        placeholder="Title, project or platform"
        value={text}
        maxLength={200}
        onChange={(e) => setText(e.target.value)}
      />
      <SelectField
        className="sm:w-48"
        label="Platform type"
        value={kind}
        onChange={(e) => onChange({ q: text.trim(), kind: e.target.value as PlatformKind | "" })}
        options={[
          { value: "", label: "All types" },
          { value: "mooring", label: "Moorings" },
          { value: "drifter", label: "Drifters" },
        ]}
      />
      <Button type="submit">Search</Button>
    </form>
  );
}
