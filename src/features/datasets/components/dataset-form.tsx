import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { createDatasetInputSchema, licences, updateDatasetInputSchema, type CreateDatasetInput, type Dataset } from "@shared/schemas/datasets";
import { applyServerErrors } from "@/lib/form-errors";
import { Alert } from "@/components/ui/alert";
import { FormActions } from "@/components/ui/form-actions";
import { SelectField, TextareaField, TextField } from "@/components/ui/field";
import { useCreateDataset } from "../api/create-dataset";
import { useUpdateDataset } from "../api/update-dataset";
import { useDeploymentOptions, type DeploymentOption } from "@/features/deployments/api/get-deployment-options";

const licenceOptions = licences.map((l) => ({ value: l, label: l === "CC-BY-4.0" ? "CC-BY-4.0 (recommended)" : l }));
const fields = ["title", "deploymentId", "description", "licence"] as const;
/** The deployment select's first choice: a one-off file. */
const noDeployment = { value: "", label: "None (one-off file; its column map is not saved)" };

export type { DeploymentOption } from "@/features/deployments/api/get-deployment-options";

export function CreateDatasetForm({
  projectId,
  deploymentOptions,
  onDone,
  onCancel,
}: {
  projectId: string;
  deploymentOptions: DeploymentOption[];
  onDone: (d: Dataset) => void;
  onCancel: () => void;
}) {
  const create = useCreateDataset(projectId);
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError } = useForm<CreateDatasetInput>({
    resolver: zodResolver(createDatasetInputSchema) as never,
    defaultValues: { title: "", deploymentId: "", licence: "CC-BY-4.0" },
  });
  const onSubmit = handleSubmit(async (v) => {
    setFormError(null);
    try {
      onDone(await create.mutateAsync(v));
    } catch (err) {
      setFormError(applyServerErrors(err, setError, fields));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate aria-label="New dataset" className="grid gap-4 sm:grid-cols-2">
      {formError ? <Alert tone="attention" className="sm:col-span-2">{formError}</Alert> : null}
      <TextField className="sm:col-span-2" label="Dataset title" hint="Say what, where and when: “Surface wind and current, Mooring A, spring 2026”." error={formState.errors.title?.message} {...register("title")} />
      <SelectField
        label="Deployment"
        hint="The period at sea this series comes from. For a drifter fleet, add the fleet as one drifter platform with a deployment and choose it here, so its column map is saved for the next file."
        options={[noDeployment, ...deploymentOptions]}
        error={formState.errors.deploymentId?.message}
        {...register("deploymentId")}
      />
      <SelectField label="Licence" hint="Applies to every released version." options={licenceOptions} error={formState.errors.licence?.message} {...register("licence")} />
      <TextareaField className="sm:col-span-2" label="Description (optional)" error={formState.errors.description?.message} {...register("description")} />
      <FormActions submitLabel="Create dataset" busy={formState.isSubmitting} onCancel={onCancel} className="sm:col-span-2" />
    </form>
  );
}

type EditValues = { title: string; deploymentId: string; description: string; licence: string };

export function EditDatasetForm({ dataset, onDone, onCancel }: { dataset: Dataset; onDone: () => void; onCancel: () => void }) {
  const update = useUpdateDataset(dataset.id);
  const [formError, setFormError] = useState<string | null>(null);
  // The deployment can change only until the first version is built (the server says so too).
  const deploymentOpen = dataset.versions.every((v) => v.state === "failed");
  const deploymentOptions = useDeploymentOptions(dataset.projectId, deploymentOpen);
  const { register, handleSubmit, formState, setError } = useForm<EditValues>({
    resolver: zodResolver(updateDatasetInputSchema) as never,
    defaultValues: { title: dataset.title, deploymentId: dataset.deploymentId ?? "", description: dataset.description ?? "", licence: dataset.licence },
  });
  const onSubmit = handleSubmit(async (v) => {
    setFormError(null);
    try {
      const input = deploymentOpen ? v : { ...v, deploymentId: undefined };
      await update.mutateAsync(input as never);
      onDone();
    } catch (err) {
      setFormError(applyServerErrors(err, setError, fields));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate aria-label="Edit dataset" className="grid gap-4 sm:grid-cols-2">
      {formError ? <Alert tone="attention" className="sm:col-span-2">{formError}</Alert> : null}
      <TextField className="sm:col-span-2" label="Dataset title" error={formState.errors.title?.message} {...register("title")} />
      {deploymentOpen ? (
        <SelectField
          label="Deployment"
          hint="Can change until the first version is built. With a deployment, the column map is kept for the next file."
          options={[noDeployment, ...deploymentOptions]}
          error={formState.errors.deploymentId?.message}
          {...register("deploymentId")}
        />
      ) : null}
      <SelectField label="Licence" options={licenceOptions} error={formState.errors.licence?.message} {...register("licence")} />
      <TextareaField className="sm:col-span-2" label="Description" error={formState.errors.description?.message} {...register("description")} />
      <FormActions submitLabel="Save dataset" busy={formState.isSubmitting} onCancel={onCancel} className="sm:col-span-2" />
    </form>
  );
}
