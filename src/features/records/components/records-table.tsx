import { useEffect, useMemo, useRef, useState } from "react";
import clsx from "clsx";
import { createColumnHelper, tableFeatures, useTable } from "@tanstack/react-table";
import { useVirtualizer } from "@tanstack/react-virtual";
import type { RecordRow } from "@shared/schemas/explore";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { FlagBadge, type QcFlag } from "@/components/ui/flag-badge";
import { Loading } from "@/components/ui/loading";
import { getErrorMessage } from "@/lib/api-client";
import { formatUtc, isoToUtcInput } from "@/lib/format";
import { useRecordPages, type RecordsFilter } from "../api/get-records";

const features = tableFeatures({});
const h = createColumnHelper<typeof features, RecordRow>();
const ROW_PX = 34;

/** "2026-10-01 06:00" (read as UTC) → ISO, or undefined when blank; null when unreadable. */
function utcInputToIso(s: string): string | undefined | null {
  const t = s.trim();
  if (!t) return undefined;
  const m = /^(\d{4}-\d{2}-\d{2})(?:[ T](\d{2}:\d{2}(?::\d{2})?))?(?:\s*(?:UTC|Z))?$/i.exec(t);
  if (!m) return null;
  const d = new Date(`${m[1]}T${m[2] ?? "00:00"}${m[2]?.length === 5 ? ":00" : ""}Z`);
  return Number.isNaN(d.getTime()) ? null : d.toISOString();
}

function fmt(x: number | null | undefined) {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  const a = Math.abs(x);
  return (a !== 0 && (a < 0.001 || a >= 1e6) ? x.toExponential(3) : x.toFixed(a < 1 ? 5 : 3)).replace(/^-/, "−");
}

/**
 * The records of a version, page by page from the server (keyset on time, or on a variable's value), rendered as a
 * virtual list so a whole month scrolls smoothly. Filters (time range, variables, flags) and the order run on the
 * server: the time header turns the time order round; a value header sorts by that variable, largest first, then
 * smallest first, then back to time.
 */
export function RecordsTable({
  versionId,
  variables,
  labels,
  initialFrom,
  initialTo,
}: {
  versionId: string;
  variables: string[];
  labels: Record<string, { label: string; unit: string }>;
  initialFrom?: string;
  initialTo?: string;
}) {
  const [fromText, setFromText] = useState(isoToUtcInput(initialFrom));
  const [toText, setToText] = useState(isoToUtcInput(initialTo));
  const [shown, setShown] = useState<string[]>(() => variables.filter((v) => ["wind_speed", "wind_from_direction", "wind_speed_10m_neutral", "magnitude_of_surface_downward_stress", "air_temperature", "eastward_sea_water_velocity", "northward_sea_water_velocity", "latitude", "longitude"].includes(v)).slice(0, 6));
  const [flagsOnly, setFlagsOnly] = useState<number[]>([]);
  const [order, setOrder] = useState<"asc" | "desc">("asc");
  const [filter, setFilter] = useState<RecordsFilter>({ variables: shown, from: initialFrom, to: initialTo, order, flags: [] });
  const [formError, setFormError] = useState<string | null>(null);
  useEffect(() => {
    setFromText(isoToUtcInput(initialFrom));
    setToText(isoToUtcInput(initialTo));
    setFilter((f) => ({ ...f, from: initialFrom, to: initialTo }));
  }, [initialFrom, initialTo]);

  const q = useRecordPages(versionId, filter);
  const rows = useMemo(() => q.data?.pages.flatMap((p) => p.items) ?? [], [q.data]);
  const cols = q.data?.pages[0]?.columns ?? [];

  const columns = useMemo(
    () =>
      h.columns([
        h.accessor("time", { header: "Time (UTC)", cell: (c) => formatUtc(c.getValue(), true) }),
        ...cols.map((col) =>
          h.accessor((r) => r.values[col.key] ?? null, {
            id: col.key,
            header: () => (
              <span>
                {col.label} <span className="normal-case tracking-normal">({col.unit})</span>
              </span>
            ),
            cell: (c) => {
              const f = c.row.original.flags[col.key];
              return (
                <span className="inline-flex items-center justify-end gap-2">
                  <span>{fmt(c.getValue())}</span>
                  {f ? <FlagBadge flag={f as QcFlag} /> : null}
                </span>
              );
            },
          }),
        ),
      ]),
    [cols],
  );
  const table = useTable({ features, columns, data: rows });

  const scroller = useRef<HTMLDivElement>(null);
  const virtual = useVirtualizer({ count: rows.length, getScrollElement: () => scroller.current, estimateSize: () => ROW_PX, overscan: 12 });
  const items = virtual.getVirtualItems();
  const lastIndex = items[items.length - 1]?.index ?? 0;
  useEffect(() => {
    if (lastIndex >= rows.length - 40 && q.hasNextPage && !q.isFetchingNextPage) void q.fetchNextPage();
  }, [lastIndex, rows.length, q]);

  const apply = (e: React.FormEvent) => {
    e.preventDefault();
    const from = utcInputToIso(fromText);
    const to = utcInputToIso(toText);
    if (from === null || to === null) return setFormError("Write times as 2026-10-01 06:00 (UTC).");
    if (from && to && to < from) return setFormError("The end of the range is before its start.");
    if (!shown.length) return setFormError("Choose at least one variable to show.");
    setFormError(null);
    setFilter({ variables: shown, from, to, order, flags: flagsOnly, sort: filter.sort && shown.includes(filter.sort) ? filter.sort : undefined });
  };
  /** The next order of a header: time flips; a variable goes largest first → smallest first → back to time. */
  const sortBy = (key: string | null) => {
    if (key === null) {
      const o = filter.sort ? "asc" : filter.order === "asc" ? "desc" : "asc";
      setOrder(o);
      return setFilter({ ...filter, sort: undefined, order: o });
    }
    if (filter.sort !== key) return setFilter({ ...filter, sort: key, order: "desc" });
    if (filter.order === "desc") return setFilter({ ...filter, order: "asc" });
    setFilter({ ...filter, sort: undefined, order });
  };
  const sortLabel = filter.sort ? (labels[filter.sort]?.label ?? filter.sort) : null;
  const toggle = <T,>(list: T[], x: T) => (list.includes(x) ? list.filter((y) => y !== x) : [...list, x]);
  const modelRows = table.getRowModel().rows;
  // Fixed widths, so the header grid and the scrolled body grid line up.
  const template = `13rem repeat(${cols.length}, 12.5rem)`;

  return (
    <div className="space-y-3" data-testid="records-table">
      <form onSubmit={apply} className="space-y-3 rounded-lg border border-line bg-surface p-3 text-sm" aria-label="Filter records">
        <div className="flex flex-wrap items-end gap-3">
          <label className="flex flex-col gap-1">
            <span className="font-semibold">From (UTC)</span>
            <input className="num rounded-md border border-field bg-surface px-2 py-1" value={fromText} onChange={(e) => setFromText(e.target.value)} placeholder="2026-10-01 06:00" data-testid="records-from" />
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-semibold">To (UTC)</span>
            <input className="num rounded-md border border-field bg-surface px-2 py-1" value={toText} onChange={(e) => setToText(e.target.value)} placeholder="2026-10-01 12:00" data-testid="records-to" />
          </label>
          <fieldset className="flex items-center gap-2">
            <legend className="mb-1 font-semibold">Only rows flagged</legend>
            {([3, 4, 2, 9] as QcFlag[]).map((f) => (
              <label key={f} className="inline-flex items-center gap-1">
                <input type="checkbox" checked={flagsOnly.includes(f)} onChange={() => setFlagsOnly(toggle(flagsOnly, f))} /> <FlagBadge flag={f} />
              </label>
            ))}
          </fieldset>
          <Button type="submit" size="sm">
            Show records
          </Button>
        </div>
        <fieldset>
          <legend className="mb-1 font-semibold">Variables</legend>
          <div className="flex flex-wrap gap-x-4 gap-y-1">
            {variables.map((v) => (
              <label key={v} className="inline-flex items-center gap-1">
                <input type="checkbox" checked={shown.includes(v)} onChange={() => setShown(toggle(shown, v))} />
                {labels[v]?.label ?? v}
              </label>
            ))}
          </div>
        </fieldset>
        {formError ? <p className="font-semibold text-signal">{formError}</p> : null}
      </form>

      {q.isPending ? (
        <Loading label="Loading records…" />
      ) : q.error ? (
        <Alert tone="attention" title="The records could not be loaded">
          {getErrorMessage(q.error)}
        </Alert>
      ) : rows.length === 0 ? (
        <EmptyState title="No records match">Widen the time range, clear the flag filter or choose other variables, then press Show records.</EmptyState>
      ) : (
        <div className="overflow-hidden rounded-lg border border-line bg-surface">
          <div role="table" aria-label="Records" aria-rowcount={q.hasNextPage ? -1 : rows.length + 1} className="overflow-x-auto">
            <div role="rowgroup" className="min-w-max">
              {table.getHeaderGroups().map((g) => (
                <div role="row" key={g.id} className="grid bg-sunken" style={{ gridTemplateColumns: template }}>
                  {g.headers.map((hd, i) => {
                    const key = i === 0 ? null : hd.id;
                    const active = key === (filter.sort ?? null);
                    const arrow = active ? (filter.order === "asc" ? "↑" : "↓") : "";
                    return (
                      <div
                        role="columnheader"
                        key={hd.id}
                        aria-sort={active ? (filter.order === "asc" ? "ascending" : "descending") : undefined}
                        className={clsx("border-b border-line px-3 py-2 text-xs font-semibold uppercase tracking-wide", i === 0 ? "text-left" : "text-right", active ? "text-fg" : "text-muted")}
                      >
                        <button
                          type="button"
                          className="uppercase hover:text-fg"
                          onClick={() => sortBy(key)}
                          title={
                            key === null
                              ? filter.sort
                                ? "Sort by time"
                                : "Turn the time order round"
                              : !active
                                ? "Sort by this variable, largest first"
                                : filter.order === "desc"
                                  ? "Smallest first"
                                  : "Back to time order"
                          }
                        >
                          <table.FlexRender header={hd} /> {arrow}
                        </button>
                      </div>
                    );
                  })}
                </div>
              ))}
            </div>
            {/* Focusable, so the keyboard can scroll the records. */}
            <div ref={scroller} role="rowgroup" tabIndex={0} className="max-h-[32rem] min-w-max overflow-y-auto" data-testid="records-scroller">
              <div style={{ height: virtual.getTotalSize(), position: "relative" }}>
                {items.map((vi) => {
                  const r = modelRows[vi.index]!;
                  return (
                    <div
                      role="row"
                      key={r.id}
                      aria-rowindex={vi.index + 2}
                      className="absolute left-0 grid w-full border-b border-line/60 hover:bg-sunken/60"
                      style={{ gridTemplateColumns: template, height: ROW_PX, transform: `translateY(${vi.start}px)` }}
                      data-testid="record-row"
                    >
                      {r.getAllCells().map((c, i) => (
                        <div role="cell" key={c.id} className={i === 0 ? "num whitespace-nowrap px-3 py-1.5" : "num whitespace-nowrap px-3 py-1 text-right"}>
                          <table.FlexRender cell={c} />
                        </div>
                      ))}
                    </div>
                  );
                })}
              </div>
            </div>
          </div>
          <p className="border-t border-line px-3 py-1.5 text-xs text-muted" role="status">
            {sortLabel ? `Sorted by ${sortLabel}, ${filter.order === "desc" ? "largest" : "smallest"} first (records without a value of it are left out). ` : ""}
            {rows.length.toLocaleString("en")} records loaded{q.hasNextPage ? "; more load as you scroll" : ", all that match"}
            {q.isFetchingNextPage ? " · loading…" : ""}
          </p>
        </div>
      )}
    </div>
  );
}
