import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm, type Resolver } from "react-hook-form";
import {
  createDeploymentInputSchema,
  updateDeploymentInputSchema,
  type CreateDeploymentInput,
  type Deployment,
} from "@shared/schemas/platforms";
import { applyServerErrors } from "@/lib/form-errors";
import { isoToUtcInput, utcInputToIso } from "@/lib/format";
import { Alert } from "@/components/ui/alert";
import { FormActions } from "@/components/ui/form-actions";
import { TextareaField, TextField } from "@/components/ui/field";
import { useCreateDeployment } from "../api/create-deployment";
import { useUpdateDeployment } from "../api/update-deployment";

/** What the inputs hold: text as typed. Times are typed as UTC wall-clock values, "YYYY-MM-DD hh:mm". */
type DeploymentFormValues = {
  name: string;
  startTime: string;
  endTime: string;
  latitude: string;
  longitude: string;
  waterDepthM: string;
  watchCircleRadiusM: string;
  anemometerHeightM: string;
  currentMeterDepthM: string;
  coastlineOffshoreBearingDeg: string;
  notes: string;
};

const numericFields = [
  "latitude",
  "longitude",
  "waterDepthM",
  "watchCircleRadiusM",
  "anemometerHeightM",
  "currentMeterDepthM",
  "coastlineOffshoreBearingDeg",
] as const;
const fields = ["name", "startTime", "endTime", ...numericFields, "notes"] as const;

/**
 * Typed text → the API's input: numbers parsed (a comma is accepted as decimal mark), times to ISO 8601 with Z.
 * A blank field is sent blank ("" or null): not given for a new deployment, cleared when editing one.
 */
function toInput(v: DeploymentFormValues): Record<string, unknown> {
  const out: Record<string, unknown> = { name: v.name, startTime: utcInputToIso(v.startTime), endTime: utcInputToIso(v.endTime), notes: v.notes };
  for (const k of numericFields) {
    const t = v[k].trim().replace(",", ".").replace("−", "-");
    out[k] = t === "" ? null : Number(t);
  }
  return out;
}

function fromDeployment(d?: Deployment): DeploymentFormValues {
  const n = (x: number | null | undefined) => (x === null || x === undefined ? "" : String(x));
  return {
    name: d?.name ?? "",
    startTime: isoToUtcInput(d?.startTime),
    endTime: isoToUtcInput(d?.endTime),
    latitude: n(d?.latitude),
    longitude: n(d?.longitude),
    waterDepthM: n(d?.waterDepthM),
    watchCircleRadiusM: n(d?.watchCircleRadiusM),
    anemometerHeightM: n(d?.anemometerHeightM),
    currentMeterDepthM: n(d?.currentMeterDepthM),
    coastlineOffshoreBearingDeg: n(d?.coastlineOffshoreBearingDeg),
    notes: d?.notes ?? "",
  };
}

/** Validate with the same zod schema the server uses, so both give the same messages. */
function makeResolver(schema: typeof createDeploymentInputSchema | typeof updateDeploymentInputSchema): Resolver<DeploymentFormValues, unknown, CreateDeploymentInput> {
  const inner = zodResolver(schema as typeof createDeploymentInputSchema) as unknown as Resolver<Record<string, unknown>, unknown, CreateDeploymentInput>;
  return async (values, ctx, opts) => {
    const result = await inner(toInput(values), ctx, opts as never);
    // An empty start gets a plain request rather than the ISO 8601 format message.
    if (!values.startTime.trim() && result.errors.startTime) result.errors.startTime.message = "Enter the start time (UTC)";
    return result as never;
  };
}

export function DeploymentForm({
  platformId,
  kind,
  deployment,
  onDone,
  onCancel,
}: {
  platformId: string;
  kind: "mooring" | "drifter";
  deployment?: Deployment;
  onDone: (d: Deployment) => void;
  onCancel: () => void;
}) {
  const create = useCreateDeployment(platformId);
  const update = useUpdateDeployment(platformId);
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError } = useForm<DeploymentFormValues, unknown, CreateDeploymentInput>({
    resolver: makeResolver(deployment ? updateDeploymentInputSchema : createDeploymentInputSchema),
    defaultValues: fromDeployment(deployment),
  });
  const e = formState.errors;

  const onSubmit = handleSubmit(async (input) => {
    setFormError(null);
    try {
      onDone(deployment ? await update.mutateAsync({ id: deployment.id, input }) : await create.mutateAsync(input));
    } catch (err) {
      setFormError(applyServerErrors(err, setError, fields));
    }
  });

  const num = { inputMode: "decimal" as const, autoComplete: "off", spellCheck: false, inputClassName: "num" };
  const time = { placeholder: "2026-03-05 12:00", autoComplete: "off", spellCheck: false, inputClassName: "num" };

  return (
    <form onSubmit={onSubmit} noValidate aria-label={deployment ? `Edit deployment ${deployment.name}` : "New deployment"} className="space-y-5">
      {formError ? <Alert tone="attention">{formError}</Alert> : null}
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-bold uppercase tracking-wide text-muted">Period at sea (UTC)</legend>
        <TextField label="Deployment name" hint="e.g. the cruise or the season: “Spring 2026”." error={e.name?.message} {...register("name")} />
        <TextField
          label="Start (UTC)"
          hint="Anchoring or launch, as YYYY-MM-DD hh:mm in UTC."
          {...time}
          error={e.startTime?.message}
          {...register("startTime")}
        />
        <TextField
          label="End (UTC)"
          hint="Recovery or loss, UTC. Leave empty while still at sea."
          {...time}
          error={e.endTime?.message}
          {...register("endTime")}
        />
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-bold uppercase tracking-wide text-muted">Nominal position</legend>
        <TextField
          label="Latitude (° north)"
          hint="Decimal degrees, negative for south."
          placeholder="57.412"
          error={e.latitude?.message}
          {...num}
          {...register("latitude")}
        />
        <TextField
          label="Longitude (° east)"
          hint="Decimal degrees, negative for west."
          placeholder="−9.875"
          error={e.longitude?.message}
          {...num}
          {...register("longitude")}
        />
        <TextField
          label="Water depth (m)"
          hint={kind === "drifter" ? "Usually left empty for drifters." : "Depth at the anchor."}
          error={e.waterDepthM?.message}
          {...num}
          {...register("waterDepthM")}
        />
        <TextField
          label="Watch-circle radius (m)"
          hint="How far the buoy may swing around its anchor; positions further out are flagged."
          error={e.watchCircleRadiusM?.message}
          {...num}
          {...register("watchCircleRadiusM")}
        />
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-bold uppercase tracking-wide text-muted">Sensors and coast</legend>
        <TextField
          label="Anemometer height (m)"
          hint="Above the sea surface; used to adjust wind to 10 m."
          error={e.anemometerHeightM?.message}
          {...num}
          {...register("anemometerHeightM")}
        />
        <TextField
          label="Current-meter depth (m)"
          hint="Below the sea surface."
          error={e.currentMeterDepthM?.message}
          {...num}
          {...register("currentMeterDepthM")}
        />
        <TextField
          label="Coastline offshore bearing (° true)"
          hint="Direction from the nearest coast straight out to sea, clockwise from true north, 0–359 (270 = sea lies to the west). Needed for the coastal upwelling index; leave empty in open ocean."
          error={e.coastlineOffshoreBearingDeg?.message}
          {...num}
          {...register("coastlineOffshoreBearingDeg")}
        />
      </fieldset>

      <TextareaField label="Notes (optional)" hint="Anything a curator should know: sensor swaps, fouling, recovery remarks." error={e.notes?.message} {...register("notes")} />

      <FormActions submitLabel={deployment ? "Save deployment" : "Create deployment"} busy={formState.isSubmitting} onCancel={onCancel} className="flex-wrap" />
    </form>
  );
}
