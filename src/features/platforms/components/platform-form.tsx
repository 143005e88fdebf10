import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm, type UseFormReturn } from "react-hook-form";
import { createPlatformInputSchema, updatePlatformInputSchema, type CreatePlatformInput, type Platform } from "@shared/schemas/platforms";
import type { z } from "zod";
import { applyServerErrors } from "@/lib/form-errors";
import { Alert } from "@/components/ui/alert";
import { FormActions } from "@/components/ui/form-actions";
import { SelectField, TextareaField, TextField } from "@/components/ui/field";
import { useCreatePlatform } from "../api/create-platform";
import { useUpdatePlatform } from "../api/update-platform";

type PlatformFormValues = z.input<typeof createPlatformInputSchema>;
type PlatformForm = UseFormReturn<PlatformFormValues, unknown, CreatePlatformInput>;

const fields = ["name", "kind", "wmoNumber", "description"] as const;
const kindOptions = [
  { value: "mooring", label: "Mooring — anchored at a fixed position" },
  { value: "drifter", label: "Drifter — moves with the current" },
];

function PlatformFields({ form }: { form: PlatformForm }) {
  const { register, formState } = form;
  return (
    <>
      <TextField label="Platform name" error={formState.errors.name?.message} {...register("name")} />
      <SelectField label="Platform type" options={kindOptions} error={formState.errors.kind?.message} {...register("kind")} />
      <TextField
        label="WMO number (optional)"
        inputMode="numeric"
        hint="5 or 7 digits, if one has been assigned."
        error={formState.errors.wmoNumber?.message}
        {...register("wmoNumber")}
      />
      <TextareaField className="sm:col-span-2" label="Description (optional)" error={formState.errors.description?.message} {...register("description")} />
    </>
  );
}

export function CreatePlatformForm({ projectId, onDone, onCancel }: { projectId: string; onDone: (p: Platform) => void; onCancel: () => void }) {
  const create = useCreatePlatform(projectId);
  const [formError, setFormError] = useState<string | null>(null);
  const form = useForm<PlatformFormValues, unknown, CreatePlatformInput>({ resolver: zodResolver(createPlatformInputSchema), defaultValues: { kind: "mooring" } });
  const onSubmit = form.handleSubmit(async (v) => {
    setFormError(null);
    try {
      onDone(await create.mutateAsync(v));
    } catch (err) {
      setFormError(applyServerErrors(err, form.setError, fields));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate aria-label="New platform" className="grid gap-4 sm:grid-cols-2">
      {formError ? <Alert tone="attention" className="sm:col-span-2">{formError}</Alert> : null}
      <PlatformFields form={form} />
      <FormActions submitLabel="Create platform" busy={form.formState.isSubmitting} onCancel={onCancel} className="sm:col-span-2" />
    </form>
  );
}

export function EditPlatformForm({ platform, onDone, onCancel }: { platform: Platform; onDone: () => void; onCancel: () => void }) {
  const update = useUpdatePlatform(platform.id);
  const [formError, setFormError] = useState<string | null>(null);
  const form: PlatformForm = useForm<PlatformFormValues, unknown, CreatePlatformInput>({
    resolver: zodResolver(updatePlatformInputSchema) as never,
    defaultValues: { name: platform.name, kind: platform.kind, wmoNumber: platform.wmoNumber ?? "", description: platform.description ?? "" },
  });
  const onSubmit = form.handleSubmit(async (v) => {
    setFormError(null);
    try {
      await update.mutateAsync(v);
      onDone();
    } catch (err) {
      setFormError(applyServerErrors(err, form.setError, fields));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate aria-label="Edit platform" className="grid gap-4 sm:grid-cols-2">
      {formError ? <Alert tone="attention" className="sm:col-span-2">{formError}</Alert> : null}
      <PlatformFields form={form} />
      <FormActions submitLabel="Save platform" busy={form.formState.isSubmitting} onCancel={onCancel} className="sm:col-span-2" />
    </form>
  );
}
