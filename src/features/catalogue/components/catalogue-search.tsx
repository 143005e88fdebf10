import { useEffect, useState } from "react";
import type { PlatformKind } from "@shared/schemas/platforms";
import type { CatalogueSort } from "@shared/schemas/catalogue";
import { derivedVariables, measuredVariables } from "@shared/vocabulary";
import { isoToUtcInput, utcInputToIso } from "@/lib/format";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import type { CatalogueFilter } from "../api/get-catalogue";

const variableOptions = [...measuredVariables, ...derivedVariables].filter((v) => v !== "latitude" && v !== "longitude");

/**
 * Search and filters. Everything lives in the page URL, so a search can be shared as a link. The area is a box in
 * decimal degrees (west, south, east, north); the time filter keeps datasets whose coverage overlaps the range.
 */
export function CatalogueSearch({ filter, fieldErrors, onChange }: { filter: CatalogueFilter; fieldErrors: Record<string, string[]>; onChange: (next: CatalogueFilter) => void }) {
  const [text, setText] = useState(filter.q ?? "");
  const [box, setBox] = useState(() => splitBox(filter.bbox));
  const [from, setFrom] = useState(isoToUtcInput(filter.from));
  const [to, setTo] = useState(isoToUtcInput(filter.to));
  const [vars, setVars] = useState<string[]>(filter.variables ? filter.variables.split(",") : []);
  useEffect(() => {
    setText(filter.q ?? "");
    setBox(splitBox(filter.bbox));
    setFrom(isoToUtcInput(filter.from));
    setTo(isoToUtcInput(filter.to));
    setVars(filter.variables ? filter.variables.split(",") : []);
  }, [filter.q, filter.bbox, filter.from, filter.to, filter.variables]);
  const advanced = !!(filter.bbox || filter.from || filter.to || filter.variables);

  const submit = (over: Partial<CatalogueFilter> = {}) =>
    onChange({
      q: text.trim() || undefined,
      kind: filter.kind,
      sort: filter.sort,
      bbox: box.every((x) => x.trim() === "") ? undefined : box.map((x) => x.trim()).join(","),
      from: utcInputToIso(from) || undefined,
      to: utcInputToIso(to) || undefined,
      variables: vars.length ? vars.join(",") : undefined,
      page: 1,
      ...over,
    });
  const err = (k: string) => fieldErrors[k]?.[0];

  return (
    <form
      role="search"
      aria-label="Search the catalogue"
      className="space-y-3 rounded-lg border border-line bg-surface p-4"
      onSubmit={(e) => {
        e.preventDefault();
        submit();
      }}
    >
      <div className="flex flex-col gap-3 sm:flex-row sm:items-end">
        <TextField
          className="flex-1"
          label="Search released datasets"
          type="search"
          placeholder="Title, project, platform or variable (e.g. wind stress)"
          value={text}
          maxLength={200}
          error={err("q")}
          onChange={(e) => setText(e.target.value)}
        />
        <SelectField
          className="sm:w-40"
          label="Platform type"
          value={filter.kind ?? ""}
          onChange={(e) => submit({ kind: (e.target.value || undefined) as PlatformKind | undefined })}
          options={[
            { value: "", label: "All types" },
            { value: "mooring", label: "Moorings" },
            { value: "drifter", label: "Drifters" },
          ]}
        />
        <SelectField
          className="sm:w-48"
          label="Sort by"
          value={filter.sort ?? "released"}
          error={err("sort")}
          onChange={(e) => submit({ sort: e.target.value as CatalogueSort })}
          options={[
            { value: "released", label: "Newest release" },
            { value: "title", label: "Title A–Z" },
            { value: "start", label: "Earliest data first" },
            { value: "end", label: "Latest data first" },
          ]}
        />
        <Button type="submit">Search</Button>
      </div>
      <details open={advanced} className="group">
        <summary className="cursor-pointer text-sm font-semibold">Area, time and variables</summary>
        <div className="mt-3 grid gap-4 lg:grid-cols-3">
          <fieldset className="space-y-2">
            <legend className="text-sm font-semibold">Area (decimal degrees)</legend>
            <div className="grid grid-cols-2 gap-2">
              {(["West", "South", "East", "North"] as const).map((side, i) => (
                <TextField
                  key={side}
                  label={`${side} (°)`}
                  inputMode="decimal"
                  inputClassName="num text-right"
                  value={box[i]}
                  placeholder={["−30", "40", "−5", "60"][i]}
                  onChange={(e) => setBox((b) => b.map((x, j) => (j === i ? e.target.value.replace("−", "-") : x)))}
                />
              ))}
            </div>
            {err("bbox") ? <p className="text-sm text-signal">{err("bbox")}</p> : <p className="text-sm text-muted">A west edge greater than the east edge spans the 180° meridian.</p>}
          </fieldset>
          <fieldset className="space-y-2">
            <legend className="text-sm font-semibold">Data between (UTC)</legend>
            <TextField label="From (UTC)" placeholder="2026-01-01 00:00" value={from} error={err("from")} onChange={(e) => setFrom(e.target.value)} />
            <TextField label="To (UTC)" placeholder="2026-12-31 23:59" value={to} error={err("to")} onChange={(e) => setTo(e.target.value)} />
          </fieldset>
          <div className="flex flex-col gap-1">
            <label htmlFor="catalogue-variables" className="text-sm font-semibold">
              Holds all of these variables
            </label>
            <select
              id="catalogue-variables"
              multiple
              size={7}
              value={vars}
              onChange={(e) => setVars([...e.target.selectedOptions].map((o) => o.value))}
              className="block w-full rounded-md border border-field bg-surface px-2 py-1 font-mono text-sm text-fg"
            >
              {variableOptions.map((v) => (
                <option key={v} value={v}>
                  {v}
                </option>
              ))}
            </select>
            <p className="text-sm text-muted">CF standard names; Ctrl or ⌘ to choose several.</p>
          </div>
        </div>
        <div className="mt-3 flex gap-2">
          <Button type="submit" size="sm">
            Apply filters
          </Button>
          {advanced ? (
            <Button type="button" size="sm" variant="ghost" onClick={() => onChange({ q: filter.q, kind: filter.kind, sort: filter.sort })}>
              Clear area, time and variables
            </Button>
          ) : null}
        </div>
      </details>
    </form>
  );
}

function splitBox(bbox: string | undefined): string[] {
  const p = (bbox ?? "").split(",");
  return [0, 1, 2, 3].map((i) => p[i] ?? "");
}
