import { Fragment, useState, type ClipboardEvent, type FormEvent } from "react";
import type { DeploymentQcSettings, VariableQc } from "@shared/schemas/qc-settings";
import { vocabulary, type MeasuredVariable } from "@shared/vocabulary";
import { dragLaws, dragLawSources } from "@shared/compute/physics";
import { ApiError, getErrorMessage } from "@/lib/api-client";
import { showToast } from "@/lib/toast";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { Loading } from "@/components/ui/loading";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";
import { useDeploymentQcSettings, useUpdateDeploymentQcSettings } from "../api/qc-settings";

/**
 * The QC thresholds of one deployment, per variable, in canonical units, in two tables: range tests (gross range:
 * sensor → fail, user → suspect; monthly climatology → suspect, off unless set) and time-series tests (spike, rate
 * of change, flat line, attenuated signal, off unless set). An empty pair switches that test off; only what differs
 * from Tauline's defaults is stored, so later changes to an untouched default still apply. Builds already made keep
 * the settings they used; the next build of a dataset on this deployment uses these.
 */

/** The inputs of one variable's row, as typed. */
const FIELDS = ["sensorMin", "sensorMax", "userMin", "userMax", "spikeSuspect", "spikeFail", "rocN", "rocWindowH", "flatEpsilon", "flatSuspectH", "flatFailH", "attWindowH", "attSuspect", "attFail"] as const;
/** Monthly climatology bounds (UTC calendar months), one input each: climMin0 … climMax11. */
const MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"] as const;
type ClimField = `climMin${number}` | `climMax${number}`;
const climMin = (m: number): ClimField => `climMin${m}`;
const climMax = (m: number): ClimField => `climMax${m}`;
const CLIM_FIELDS: ClimField[] = MONTHS.flatMap((_, m) => [climMin(m), climMax(m)]);
type Field = (typeof FIELDS)[number] | ClimField;
type Row = Record<Field, string>;
type Tests = Pick<VariableQc, "sensor" | "user" | "climatology" | "spike" | "rateOfChange" | "flatLine" | "attenuatedSignal">;

/** Twelve significant digits: −60 °C in kelvin reads 213.15, not 213.14999999999998. */
const text = (x: number | null | undefined) => (x === null || x === undefined ? "" : String(Number(x.toPrecision(12))));
const hours = (s: number | null | undefined) => (s === null || s === undefined ? "" : text(s / 3600));

/** The inputs behind each test, to tell an untouched test (left to the defaults) from an edited one. */
const TEST_FIELDS: Record<keyof Tests, Field[]> = {
  sensor: ["sensorMin", "sensorMax"],
  user: ["userMin", "userMax"],
  climatology: CLIM_FIELDS,
  spike: ["spikeSuspect", "spikeFail"],
  rateOfChange: ["rocN", "rocWindowH"],
  flatLine: ["flatEpsilon", "flatSuspectH", "flatFailH"],
  attenuatedSignal: ["attWindowH", "attSuspect", "attFail"],
};

function rowOf(q: VariableQc): Row {
  return {
    sensorMin: text(q.sensor?.min),
    sensorMax: text(q.sensor?.max),
    userMin: text(q.user?.min),
    userMax: text(q.user?.max),
    spikeSuspect: text(q.spike?.suspect),
    spikeFail: text(q.spike?.fail),
    rocN: text(q.rateOfChange?.n),
    rocWindowH: hours(q.rateOfChange?.windowS),
    flatEpsilon: text(q.flatLine?.epsilon),
    flatSuspectH: hours(q.flatLine?.suspectAfterS),
    flatFailH: hours(q.flatLine?.failAfterS),
    attWindowH: hours(q.attenuatedSignal?.windowS),
    attSuspect: text(q.attenuatedSignal?.suspectBelow),
    attFail: text(q.attenuatedSignal?.failBelow),
    ...Object.fromEntries(MONTHS.flatMap((_, m) => [[climMin(m), text(q.climatology?.min[m])], [climMax(m), text(q.climatology?.max[m])]])),
  } as Row;
}

/** A typed number, null when blank; text that is not a number is sent as is so the server names it. */
const num = (s: string): number | string | null => (s.trim() === "" ? null : Number.isFinite(Number(s)) ? Number(s) : s.trim());
const blank = (...xs: string[]) => xs.every((x) => x.trim() === "");
const seconds = (h: string) => {
  const x = num(h);
  return typeof x === "number" ? x * 3600 : x;
};

/** The tests a row describes; `current` supplies what the table does not show (minimum counts). */
function testsOf(r: Row, current: VariableQc): Tests {
  return {
    sensor: blank(r.sensorMin, r.sensorMax) ? null : ({ min: num(r.sensorMin), max: num(r.sensorMax) } as Tests["sensor"]),
    user: blank(r.userMin, r.userMax) ? null : ({ min: num(r.userMin), max: num(r.userMax) } as Tests["user"]),
    climatology: blank(...CLIM_FIELDS.map((f) => r[f]))
      ? null
      : ({ min: MONTHS.map((_, m) => num(r[climMin(m)])), max: MONTHS.map((_, m) => num(r[climMax(m)])) } as Tests["climatology"]),
    spike: blank(r.spikeSuspect, r.spikeFail) ? null : ({ suspect: num(r.spikeSuspect), fail: num(r.spikeFail) } as Tests["spike"]),
    rateOfChange: blank(r.rocN, r.rocWindowH)
      ? null
      : ({ n: num(r.rocN), windowS: seconds(r.rocWindowH), minCount: current.rateOfChange?.minCount ?? 3 } as Tests["rateOfChange"]),
    flatLine: blank(r.flatEpsilon, r.flatSuspectH, r.flatFailH)
      ? null
      : ({
          epsilon: num(r.flatEpsilon),
          suspectCount: current.flatLine?.suspectCount ?? 3,
          failCount: current.flatLine?.failCount ?? 5,
          suspectAfterS: blank(r.flatSuspectH) ? null : seconds(r.flatSuspectH),
          failAfterS: blank(r.flatFailH) ? null : seconds(r.flatFailH),
        } as Tests["flatLine"]),
    attenuatedSignal: blank(r.attWindowH, r.attSuspect, r.attFail)
      ? null
      : ({
          windowS: seconds(r.attWindowH),
          suspectBelow: num(r.attSuspect),
          failBelow: num(r.attFail),
          minCount: current.attenuatedSignal?.minCount ?? 3,
        } as Tests["attenuatedSignal"]),
  };
}

/** How many months of a row's climatology have both bounds, in words. */
function monthsSet(r: Row): string {
  const n = MONTHS.filter((_, m) => r[climMin(m)].trim() !== "" && r[climMax(m)].trim() !== "").length;
  return n === 0 && blank(...CLIM_FIELDS.map((f) => r[f])) ? "off" : n === 12 ? "all 12 months" : `${n} of 12 months`;
}

/** Why a row's climatology cannot be saved as typed (some bounds given, others blank), or null. */
function halfFilledMonth(r: Row): string | null {
  if (blank(...CLIM_FIELDS.map((f) => r[f]))) return null;
  const missing = MONTHS.flatMap((m, i) => [r[climMin(i)].trim() ? [] : [`${m} minimum`], r[climMax(i)].trim() ? [] : [`${m} maximum`]].flat());
  if (!missing.length) return null;
  const named = missing.length > 3 ? `${missing.slice(0, 3).join(", ")} and ${missing.length - 3} more` : missing.join(", ");
  return `give both bounds for every month, or leave all twelve blank (blank: ${named})`;
}

/** The stored overrides with each shown test set where it differs from the default and removed where it does not. */
function overridesFrom(data: DeploymentQcSettings, rows: Record<string, Row>): Record<string, unknown> {
  const out: Record<string, unknown> = structuredClone(data.overrides);
  const vars: Record<string, Record<string, unknown>> = { ...((out.variables as Record<string, Record<string, unknown>> | undefined) ?? {}) };
  for (const [v, r] of Object.entries(rows)) {
    const key = v as MeasuredVariable;
    const tests = testsOf(r, data.settings.variables[key]);
    const defaults = rowOf(data.defaults.variables[key]);
    const o: Record<string, unknown> = { ...(vars[v] ?? {}) };
    for (const [t, fields] of Object.entries(TEST_FIELDS)) {
      // Compared as shown, so a default that displays rounded is not taken for an edit.
      if (fields.every((f) => r[f].trim() === defaults[f])) delete o[t];
      else o[t] = tests[t as keyof Tests];
    }
    if (Object.keys(o).length) vars[v] = o;
    else delete vars[v];
  }
  if (Object.keys(vars).length) out.variables = vars;
  else delete out.variables;
  return out;
}

const GAP_FLAG_OPTIONS = [
  { value: "4", label: "fail (4)" },
  { value: "3", label: "suspect (3)" },
];
const DRAG_LAW_OPTIONS = dragLaws.map((l) => ({ value: l, label: l }));
const AIR_DENSITY_OPTIONS = [
  { value: "fixed", label: "fixed value" },
  { value: "ideal_gas", label: "from p, T and RH" },
];

const SITE_GRID = "grid grid-cols-2 gap-3 md:grid-cols-4 xl:grid-cols-6";
const NEUTRAL_WIND_OPTIONS = [
  { value: "power", label: "power law" },
  { value: "log", label: "log law" },
  { value: "drag", label: "with the drag law" },
];

type SiteSection = "timing" | "checks" | "diagnostics";
/** Deployment-wide numbers: their path in the settings (group.key), label with unit, and where they are shown. */
const SITE_NUMBERS: { path: string; label: string; hint?: string; section: SiteSection }[] = [
  { path: "timing.expectedIntervalS", label: "Sampling interval (s)", hint: "Blank: taken from the file", section: "timing" },
  { path: "timing.gapFactor", label: "Gap after (× interval)", section: "timing" },
  { path: "multiVariate.calmSpeed", label: "Calm below (m s-1)", hint: "Wind direction is then not evaluated (2)", section: "checks" },
  { path: "multiVariate.lightSpeed", label: "Light wind below (m s-1)", section: "checks" },
  { path: "multiVariate.maxDirectionStepDeg", label: "Direction step in light wind (°)", hint: "A larger step between readings is suspect", section: "checks" },
  { path: "impliedSpeed.suspect", label: "Drift speed: suspect (m s-1)", hint: "Speed between consecutive positions above this", section: "checks" },
  { path: "impliedSpeed.fail", label: "Drift speed: fail (m s-1)", section: "checks" },
  { path: "diagnostics.seawaterDensity", label: "Seawater density (kg m-3)", section: "diagnostics" },
  { path: "diagnostics.equatorCutoffDeg", label: "Equator cut-off (° latitude)", hint: "Diagnostics divided by f are not evaluated nearer the equator", section: "diagnostics" },
  { path: "diagnostics.eddyViscosity", label: "Eddy viscosity A_z (m2 s-1)", hint: "Theoretical Ekman depth and surface current", section: "diagnostics" },
  { path: "diagnostics.ekmanDepthCoefficient", label: "Ekman depth coefficient", hint: "Empirical depth = coefficient · U10 / √sin|φ|", section: "diagnostics" },
];
type Settings = DeploymentQcSettings["settings"];
const at = (q: Settings, path: string) => path.split(".").reduce<unknown>((o, k) => (o as Record<string, unknown> | null)?.[k], q) as number | null;

/** Deployment-wide settings shown above the table, as typed: the numbers by path, and the choices. */
type Site = {
  numbers: Record<string, string>;
  gapFlag: string;
  dragLaw: string;
  airMethod: string;
  airValue: string;
  neutralMethod: string;
  powerExponent: string;
  z0: string;
};

function siteOf(q: Settings): Site {
  const air = q.diagnostics.airDensity;
  return {
    numbers: Object.fromEntries(SITE_NUMBERS.map((f) => [f.path, text(at(q, f.path))])),
    gapFlag: String(q.timing.gapFlag),
    dragLaw: q.diagnostics.dragLaw,
    airMethod: air.method,
    airValue: air.method === "fixed" ? text(air.value) : "",
    neutralMethod: q.diagnostics.neutralWind.method,
    powerExponent: text(q.diagnostics.neutralWind.powerExponent),
    z0: text(q.diagnostics.neutralWind.z0),
  };
}

/** Sets `out[group][key]` to `value` when the shown text differs from the default's, and removes it when not. */
function setOrClear(out: Record<string, unknown>, group: string, key: string, changed: boolean, value: unknown) {
  const g: Record<string, unknown> = { ...((out[group] as Record<string, unknown> | undefined) ?? {}) };
  if (changed) g[key] = value;
  else delete g[key];
  if (Object.keys(g).length) out[group] = g;
  else delete out[group];
}

/** The overrides with the deployment-wide settings folded in (only where they differ from the defaults). */
function withSite(overrides: Record<string, unknown>, data: DeploymentQcSettings, site: Site): Record<string, unknown> {
  const out = structuredClone(overrides);
  const d = siteOf(data.defaults);
  for (const { path } of SITE_NUMBERS) {
    const [group, key] = path.split(".") as [string, string];
    setOrClear(out, group, key, site.numbers[path]!.trim() !== d.numbers[path], num(site.numbers[path]!));
  }
  setOrClear(out, "timing", "gapFlag", site.gapFlag !== d.gapFlag, Number(site.gapFlag));
  setOrClear(out, "diagnostics", "dragLaw", site.dragLaw !== d.dragLaw, site.dragLaw);
  const airChanged = site.airMethod !== d.airMethod || (site.airMethod === "fixed" && site.airValue.trim() !== d.airValue);
  setOrClear(out, "diagnostics", "airDensity", airChanged, site.airMethod === "fixed" ? { method: "fixed", value: num(site.airValue) } : { method: "ideal_gas" });
  const neutralChanged = site.neutralMethod !== d.neutralMethod || site.powerExponent.trim() !== d.powerExponent || site.z0.trim() !== d.z0;
  setOrClear(out, "diagnostics", "neutralWind", neutralChanged, { method: site.neutralMethod, powerExponent: num(site.powerExponent), z0: num(site.z0) });
  return out;
}

/** Variables with at least one test by default (positions are checked by the location test, not here). */
const shown = (d: DeploymentQcSettings) =>
  (Object.keys(d.defaults.variables) as MeasuredVariable[]).filter((v) => {
    const q = d.defaults.variables[v];
    return q.sensor || q.user || q.spike || q.rateOfChange || q.flatLine;
  });

/** Error paths of the deployment-wide settings → their labels (without units). */
const SITE_LABELS: Record<string, string> = {
  ...Object.fromEntries(SITE_NUMBERS.map((f) => [f.path, f.label.replace(/ \(.*\)$/, "")])),
  "diagnostics.airDensity.value": "Air density",
  "diagnostics.neutralWind.powerExponent": "Power-law exponent",
  "diagnostics.neutralWind.z0": "Roughness length z0",
};

/** "overrides.variables.wind_speed.spike.fail" → "Wind speed, spike fail: …" */
function readableProblems(e: unknown): string[] {
  if (!(e instanceof ApiError) || !Object.keys(e.fields).length) return [getErrorMessage(e)];
  return Object.entries(e.fields).map(([path, msgs]) => {
    const parts = path.replace(/^overrides\./, "").split(".");
    const v = parts[0] === "variables" ? vocabulary[parts[1] as MeasuredVariable] : undefined;
    const rest = parts[2] === "climatology" && parts.length === 5 ? [`climatology ${parts[3] === "min" ? "minimum" : "maximum"} in ${MONTHS[Number(parts[4])] ?? parts[4]}`] : parts.slice(2);
    const where = v ? `${v.label}, ${rest.join(" ")}` : (SITE_LABELS[parts.join(".")] ?? parts.join(" "));
    return `${where}: ${msgs.join("; ")}`;
  });
}

export function QcThresholdsEditor({ deploymentId, deploymentName, canEdit, onClose }: { deploymentId: string; deploymentName: string; canEdit: boolean; onClose: () => void }) {
  const query = useDeploymentQcSettings(deploymentId);
  if (query.isPending) return <Loading label="Loading the QC thresholds…" />;
  if (query.error) return <Alert tone="attention">{getErrorMessage(query.error)}</Alert>;
  return <Editor key={query.data.updatedAt ?? "defaults"} data={query.data} deploymentName={deploymentName} canEdit={canEdit} onClose={onClose} />;
}

function Editor({ data, deploymentName, canEdit, onClose }: { data: DeploymentQcSettings; deploymentName: string; canEdit: boolean; onClose: () => void }) {
  const variables = shown(data);
  const [rows, setRows] = useState<Record<string, Row>>(() => Object.fromEntries(variables.map((v) => [v, rowOf(data.settings.variables[v])])));
  const [site, setSite] = useState<Site>(() => siteOf(data.settings));
  const [problems, setProblems] = useState<string[]>([]);
  const [monthsOpen, setMonthsOpen] = useState<MeasuredVariable[]>([]);
  const save = useUpdateDeploymentQcSettings(data.deploymentId);
  const changed = variables.filter((v) => JSON.stringify(rowOf(data.defaults.variables[v])) !== JSON.stringify(rows[v]));

  const submit = (overrides: Record<string, unknown>, done: string) => {
    setProblems([]);
    save.mutate(overrides, {
      onSuccess: () => showToast(done, "success"),
      onError: (e) => setProblems(readableProblems(e)),
    });
  };
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const partial = variables.flatMap((v) => {
      const gap = halfFilledMonth(rows[v]!);
      return gap ? [`${vocabulary[v].label}, monthly climatology: ${gap}`] : [];
    });
    if (partial.length) {
      setMonthsOpen((o) => [...new Set([...o, ...variables.filter((v) => halfFilledMonth(rows[v]!))])]);
      return setProblems(partial);
    }
    submit(withSite(overridesFrom(data, rows), data, site), `QC thresholds of “${deploymentName}” saved. The next build uses them.`);
  };
  /**
   * Pasting several numbers into a month (copied from a spreadsheet: a row, or a row of minima above a row of
   * maxima) fills that month and the ones after it; a single number pastes as usual.
   */
  const pasteMonths = (v: string, side: "min" | "max", from: number) => (e: ClipboardEvent<HTMLInputElement>) => {
    const lines = e.clipboardData
      .getData("text/plain")
      .trim()
      .split(/\r?\n/)
      .map((l) => l.trim().split(/[\t;, ]+/).filter(Boolean));
    if (lines.length === 1 && lines[0]!.length < 2) return;
    e.preventDefault();
    const sides: ("min" | "max")[] = lines.length > 1 && side === "min" ? ["min", "max"] : [side];
    setRows((r) => {
      const row = { ...r[v]! };
      sides.forEach((sd, k) =>
        lines[k]!.slice(0, 12 - from).forEach((x, j) => {
          row[sd === "min" ? climMin(from + j) : climMax(from + j)] = x;
        }),
      );
      return { ...r, [v]: row };
    });
  };
  const cell = (v: string, f: Field, label: string, onPaste?: (e: ClipboardEvent<HTMLInputElement>) => void) => (
    <input
      onPaste={onPaste}
      aria-label={`${vocabulary[v as MeasuredVariable].label}: ${label}`}
      className="num w-[4.25rem] rounded border border-field bg-surface px-1 py-1 text-right text-xs disabled:border-transparent disabled:bg-transparent"
      inputMode="decimal"
      disabled={!canEdit}
      placeholder="off"
      value={rows[v]![f]}
      onChange={(e) => setRows((r) => ({ ...r, [v]: { ...r[v]!, [f]: e.target.value } }))}
    />
  );
  const pair = (v: string, a: Field, b: Field, la: string, lb: string) => (
    <span className="inline-flex items-center gap-1">
      {cell(v, a, la)}
      <span aria-hidden className="text-muted">
        –
      </span>
      {cell(v, b, lb)}
    </span>
  );

  const numbers = (section: SiteSection) =>
    SITE_NUMBERS.filter((f) => f.section === section).map((f) => (
      <TextField
        key={f.path}
        label={f.label}
        hint={f.hint}
        inputMode="decimal"
        value={site.numbers[f.path]}
        onChange={(e) => setSite({ ...site, numbers: { ...site.numbers, [f.path]: e.target.value } })}
      />
    ));
  const variableCell = (v: MeasuredVariable) => (
    <>
      <div className="whitespace-nowrap font-semibold">{vocabulary[v].label}</div>
      <div className="text-sm text-muted">
        {vocabulary[v].canonicalUnit}
        {changed.includes(v) ? " · changed from the defaults" : ""}
      </div>
    </>
  );
  /** One setting, then a suspect – fail pair (flat line, attenuated signal). */
  const cellAndPair = (v: string, one: [Field, string], a: [Field, string], b: [Field, string]) => (
    <span className="inline-flex items-center gap-1.5">
      {cell(v, one[0], one[1])}
      {pair(v, a[0], b[0], a[1], b[1])}
    </span>
  );

  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-3">
      <p className="max-w-4xl text-sm text-muted">
        Values are in each variable’s canonical unit (temperatures in kelvin, pressures in pascal, humidity as a fraction; rate-of-change windows,
        flat-line durations and attenuated-signal windows in hours). The attenuated-signal test flags a sensor whose readings stop moving — the range
        over the window falls below a floor, as with a fouled or iced sensor — and is off until you give it a window and floors. The monthly
        climatology (under Months) is off until you give bounds for all twelve months. A blank pair switches that test off; only what differs from
        Tauline’s defaults is stored. Versions already built keep
        the settings they used; the next build of a dataset on this deployment uses these. The starting values are common practice for moored sensors:
        tune them to the site and its instruments.
      </p>
      <fieldset className={SITE_GRID} disabled={!canEdit}>
        <legend className="mb-1 text-sm font-semibold">Sampling and gaps</legend>
        {numbers("timing")}
        <SelectField label="A gap is flagged" options={GAP_FLAG_OPTIONS} value={site.gapFlag} onChange={(e) => setSite({ ...site, gapFlag: e.target.value })} />
      </fieldset>
      <fieldset className={SITE_GRID} disabled={!canEdit}>
        <legend className="mb-1 text-sm font-semibold">Wind direction and drifter checks</legend>
        {numbers("checks")}
      </fieldset>
      <fieldset className={SITE_GRID} disabled={!canEdit}>
        <legend className="mb-1 text-sm font-semibold">Diagnostics</legend>
        <SelectField
          label="Drag law"
          hint={dragLawSources[site.dragLaw as keyof typeof dragLawSources]?.split(";")[0]}
          options={DRAG_LAW_OPTIONS}
          value={site.dragLaw}
          onChange={(e) => setSite({ ...site, dragLaw: e.target.value })}
        />
        <SelectField label="Air density" options={AIR_DENSITY_OPTIONS} value={site.airMethod} onChange={(e) => setSite({ ...site, airMethod: e.target.value })} />
        {site.airMethod === "fixed" ? (
          <TextField label="Air density (kg m-3)" inputMode="decimal" value={site.airValue} onChange={(e) => setSite({ ...site, airValue: e.target.value })} />
        ) : null}
        <SelectField
          label="Wind at 10 m"
          hint="How the wind at the anemometer becomes the equivalent-neutral 10 m wind"
          options={NEUTRAL_WIND_OPTIONS}
          value={site.neutralMethod}
          onChange={(e) => setSite({ ...site, neutralMethod: e.target.value })}
        />
        {site.neutralMethod === "power" ? (
          <TextField label="Power-law exponent" inputMode="decimal" value={site.powerExponent} onChange={(e) => setSite({ ...site, powerExponent: e.target.value })} />
        ) : site.neutralMethod === "log" ? (
          <TextField label="Roughness length z0 (m)" inputMode="decimal" value={site.z0} onChange={(e) => setSite({ ...site, z0: e.target.value })} />
        ) : null}
        {numbers("diagnostics")}
      </fieldset>
      <h3 className="mt-1 text-sm font-semibold">Range tests</h3>
      <Table caption={`Range tests of ${deploymentName}`}>
        <thead>
          <tr>
            <Th>Variable</Th>
            <Th unit="min – max">Fail outside</Th>
            <Th unit="min – max">Suspect outside</Th>
            <Th unit="suspect outside, per UTC month">Monthly climatology</Th>
          </tr>
        </thead>
        <tbody>
          {variables.map((v) => (
            <Fragment key={v}>
              <Tr>
                <Td>{variableCell(v)}</Td>
                <Td>{pair(v, "sensorMin", "sensorMax", "fail below", "fail above")}</Td>
                <Td>{pair(v, "userMin", "userMax", "suspect below", "suspect above")}</Td>
                <Td>
                  <span className="inline-flex items-center gap-2">
                    <span className="text-sm text-muted">{monthsSet(rows[v]!)}</span>
                    <Button
                      variant="secondary"
                      size="sm"
                      aria-expanded={monthsOpen.includes(v)}
                      // The visible word first, so speech control finds it (WCAG 2.5.3, label in name).
                      aria-label={`${monthsOpen.includes(v) ? "Hide months" : "Months"}: ${vocabulary[v].label} monthly climatology`}
                      onClick={() => setMonthsOpen((o) => (o.includes(v) ? o.filter((x) => x !== v) : [...o, v]))}
                    >
                      {monthsOpen.includes(v) ? "Hide months" : "Months"}
                    </Button>
                  </span>
                </Td>
              </Tr>
              {monthsOpen.includes(v) ? (
                <tr>
                  <td colSpan={4} className="border-b border-line/70 bg-sunken/40 px-3 py-3">
                    <div className="overflow-x-auto">
                      <table className="text-xs">
                        <caption className="sr-only">Monthly climatology of {vocabulary[v].label}</caption>
                        <thead>
                          <tr>
                            <th scope="col" className="pr-2 text-left font-semibold text-muted">
                              {vocabulary[v].canonicalUnit}
                            </th>
                            {MONTHS.map((m) => (
                              <th key={m} scope="col" className="px-0.5 pb-1 text-center font-semibold text-muted">
                                {m.slice(0, 3)}
                              </th>
                            ))}
                          </tr>
                        </thead>
                        <tbody>
                          {(["min", "max"] as const).map((side) => (
                            <tr key={side}>
                              <th scope="row" className="whitespace-nowrap pr-2 text-left font-normal text-muted">
                                {side === "min" ? "suspect below" : "suspect above"}
                              </th>
                              {MONTHS.map((m, i) => (
                                <td key={m} className="px-0.5 py-0.5">
                                  {cell(v, side === "min" ? climMin(i) : climMax(i), `climatology ${side === "min" ? "minimum" : "maximum"} in ${m}`, pasteMonths(v, side, i))}
                                </td>
                              ))}
                            </tr>
                          ))}
                        </tbody>
                      </table>
                    </div>
                    <p className="mt-2 text-xs text-muted">
                      A value outside its month’s bounds is suspect (3). Give both bounds for all twelve months, or leave them all blank to switch the test off.
                      Pasting a row of numbers from a spreadsheet fills the months from the one you paste into; a row of minima above a row of maxima
                      fills both.
                    </p>
                  </td>
                </tr>
              ) : null}
            </Fragment>
          ))}
        </tbody>
      </Table>
      <h3 className="mt-1 text-sm font-semibold">Time-series tests</h3>
      <Table caption={`Time-series tests of ${deploymentName}`}>
        <thead>
          <tr>
            <Th>Variable</Th>
            <Th unit="suspect – fail">Spike</Th>
            <Th unit="n·σ – window h">Rate of change</Th>
            <Th unit="within ε; suspect – fail h">Flat line</Th>
            <Th unit="window h; range below: suspect – fail">Attenuated signal</Th>
          </tr>
        </thead>
        <tbody>
          {variables.map((v) => (
            <Tr key={v}>
              <Td>{variableCell(v)}</Td>
              <Td>{pair(v, "spikeSuspect", "spikeFail", "spike suspect at", "spike fail at")}</Td>
              <Td>{pair(v, "rocN", "rocWindowH", "rate of change N", "rate of change window in hours")}</Td>
              <Td>{cellAndPair(v, ["flatEpsilon", "flat line epsilon"], ["flatSuspectH", "flat line suspect after hours"], ["flatFailH", "flat line fail after hours"])}</Td>
              <Td>
                {cellAndPair(
                  v,
                  ["attWindowH", "attenuated signal window in hours"],
                  ["attSuspect", "attenuated signal suspect below range"],
                  ["attFail", "attenuated signal fail below range"],
                )}
              </Td>
            </Tr>
          ))}
        </tbody>
      </Table>
      {problems.length ? (
        <Alert tone="attention">
          <p className="font-semibold">Nothing was saved. Check:</p>
          <ul className="list-disc pl-5">
            {problems.map((p) => (
              <li key={p}>{p}</li>
            ))}
          </ul>
        </Alert>
      ) : null}
      <div className="flex flex-wrap items-center gap-2">
        {canEdit ? (
          <>
            <Button type="submit" busy={save.isPending} disabled={save.isPending}>
              Save thresholds
            </Button>
            <Button variant="secondary" disabled={save.isPending} onClick={() => submit({}, `QC thresholds of “${deploymentName}” are back to the defaults.`)}>
              Back to defaults
            </Button>
          </>
        ) : null}
        <Button variant="secondary" onClick={onClose}>
          Close
        </Button>
        <span className="text-sm text-muted">
          {data.updatedAt ? (
            <>
              Last changed <UtcTime iso={data.updatedAt} />
              {data.updatedByName ? ` by ${data.updatedByName}` : ""}.
            </>
          ) : (
            "Tauline’s defaults: nothing changed for this deployment yet."
          )}
        </span>
      </div>
    </form>
  );
}
