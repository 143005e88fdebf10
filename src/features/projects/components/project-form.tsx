import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { createProjectInputSchema, updateProjectInputSchema, type CreateProjectInput, type Project } from "@shared/schemas/projects";
import type { z } from "zod";
import { applyServerErrors } from "@/lib/form-errors";
import { Alert } from "@/components/ui/alert";
import { FormActions } from "@/components/ui/form-actions";
import { TextareaField, TextField } from "@/components/ui/field";
import { useCreateProject } from "../api/create-project";
import { useUpdateProject } from "../api/update-project";

const fields = ["name", "slug", "description"] as const;

const slugify = (s: string) =>
  s
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 40);

export function CreateProjectForm({ onDone, onCancel }: { onDone: (p: Project) => void; onCancel: () => void }) {
  const create = useCreateProject();
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError, setValue, getFieldState } = useForm<z.input<typeof createProjectInputSchema>, unknown, CreateProjectInput>({
    resolver: zodResolver(createProjectInputSchema),
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
    <form onSubmit={onSubmit} noValidate className="grid gap-4 sm:grid-cols-2" aria-label="New project">
      {formError ? <Alert tone="attention" className="sm:col-span-2">{formError}</Alert> : null}
      <TextField
        label="Project name"
        error={formState.errors.name?.message}
        {...register("name", {
          onChange: (e) => {
            if (!getFieldState("slug").isDirty) setValue("slug", slugify(e.target.value));
          },
        })}
      />
      <TextField
        label="Short name"
        hint="Used in links and file names: lower-case letters, digits and hyphens."
        error={formState.errors.slug?.message}
        {...register("slug")}
      />
      <TextareaField className="sm:col-span-2" label="Description (optional)" error={formState.errors.description?.message} {...register("description")} />
      <FormActions submitLabel="Create project" busy={formState.isSubmitting} onCancel={onCancel} className="sm:col-span-2" />
    </form>
  );
}

export function EditProjectForm({ project, onDone, onCancel }: { project: Project; onDone: () => void; onCancel: () => void }) {
  const update = useUpdateProject(project.id);
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError } = useForm<z.input<typeof createProjectInputSchema>, unknown, CreateProjectInput>({
    resolver: zodResolver(updateProjectInputSchema) as never,
    defaultValues: { name: project.name, slug: project.slug, description: project.description ?? "" },
  });
  const onSubmit = handleSubmit(async (v) => {
    setFormError(null);
    try {
      await update.mutateAsync(v);
      onDone();
    } catch (err) {
      setFormError(applyServerErrors(err, setError, fields));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-4 sm:grid-cols-2" aria-label="Edit project">
      {formError ? <Alert tone="attention" className="sm:col-span-2">{formError}</Alert> : null}
      <TextField label="Project name" error={formState.errors.name?.message} {...register("name")} />
      <TextField
        label="Short name"
        hint="Changing it changes the project's file names in future exports."
        error={formState.errors.slug?.message}
        {...register("slug")}
      />
      <TextareaField className="sm:col-span-2" label="Description" error={formState.errors.description?.message} {...register("description")} />
      <FormActions submitLabel="Save project" busy={formState.isSubmitting} onCancel={onCancel} className="sm:col-span-2" />
    </form>
  );
}
