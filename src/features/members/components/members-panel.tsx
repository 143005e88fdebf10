import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { addMemberInputSchema, projectRoles, type AddMemberInput, type Member } from "@shared/schemas/projects";
import { applyServerErrors } from "@/lib/form-errors";
import { formatUtcDate } from "@/lib/format";
import { showToast } from "@/lib/toast";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { EmptyState } from "@/components/ui/empty-state";
import { RoleBadge } from "@/components/ui/state-badge";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { useAddMember } from "../api/add-member";
import { useRemoveMember } from "../api/remove-member";

const roleOptions = projectRoles.map((r) => ({ value: r, label: r === "curator" ? "Curator — reviews and releases" : "Contributor — uploads and edits" }));

export function AddMemberForm({ projectId }: { projectId: string }) {
  const add = useAddMember(projectId);
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError, reset } = useForm<AddMemberInput>({
    resolver: zodResolver(addMemberInputSchema),
    defaultValues: { email: "", role: "contributor" },
  });
  const onSubmit = handleSubmit(async (v) => {
    setFormError(null);
    try {
      const m = await add.mutateAsync(v);
      showToast(`${m.name} added as ${m.role}.`, "success");
      reset({ email: "", role: v.role });
    } catch (err) {
      setFormError(applyServerErrors(err, setError, ["email", "role"]));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate aria-label="Add a member" className="grid gap-3 rounded-lg border border-line bg-surface p-4 sm:grid-cols-[1fr_16rem_auto] sm:items-start">
      {formError ? <Alert tone="attention" className="sm:col-span-3">{formError}</Alert> : null}
      <TextField label="Member's e-mail" type="email" hint="The person needs a Tauline account first." error={formState.errors.email?.message} {...register("email")} />
      <SelectField label="Role" options={roleOptions} error={formState.errors.role?.message} {...register("role")} />
      <Button type="submit" className="sm:mt-7" busy={formState.isSubmitting} disabled={formState.isSubmitting}>
        Add member
      </Button>
    </form>
  );
}

export function MembersTable({ projectId, items, canManage }: { projectId: string; items: Member[]; canManage: boolean }) {
  const remove = useRemoveMember(projectId);
  const [confirming, setConfirming] = useState<string | null>(null);
  if (items.length === 0) {
    return (
      <EmptyState title="No members yet">
        {canManage ? "Add contributors and curators with the form above." : "An administrator adds contributors and curators to this project."}
      </EmptyState>
    );
  }
  return (
    <Table caption="Project members">
      <thead>
        <tr>
          <Th>Name</Th>
          <Th>E-mail</Th>
          <Th>Role</Th>
          <Th>Member since (UTC)</Th>
          {canManage ? <Th className="text-right">Actions</Th> : null}
        </tr>
      </thead>
      <tbody>
        {items.map((m) => (
          <Tr key={m.userId}>
            <Td className="font-semibold">{m.name}</Td>
            <Td className="whitespace-nowrap">{m.email}</Td>
            <Td>
              <RoleBadge role={m.role} />
            </Td>
            <Td className="num">{formatUtcDate(m.since)}</Td>
            {canManage ? (
              <Td className="text-right">
                {confirming === m.userId ? (
                  <span className="inline-flex flex-wrap justify-end gap-1">
                    <Button
                      size="sm"
                      variant="attention"
                      busy={remove.isPending}
                      onClick={() => remove.mutate(m.userId, { onSettled: () => setConfirming(null) })}
                    >
                      Confirm removal of {m.name}
                    </Button>
                    <Button size="sm" variant="secondary" onClick={() => setConfirming(null)}>
                      Keep
                    </Button>
                  </span>
                ) : (
                  <Button size="sm" variant="secondary" onClick={() => setConfirming(m.userId)} aria-label={`Remove ${m.name} from the project`}>
                    Remove
                  </Button>
                )}
              </Td>
            ) : null}
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}
