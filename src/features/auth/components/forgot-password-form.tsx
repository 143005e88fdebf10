import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { z } from "zod";
import { paths } from "@/config/paths";
import { authClient, authErrorMessage } from "@/lib/auth-client";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

const schema = z.object({ email: z.email("Enter the e-mail address of your account") });

export function ForgotPasswordForm() {
  const [sent, setSent] = useState<string | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<z.infer<typeof schema>>({ resolver: zodResolver(schema) });

  const onSubmit = handleSubmit(async (v) => {
    setFormError(null);
    const { error } = await authClient.requestPasswordReset({ email: v.email, redirectTo: paths.resetPassword() });
    if (error) {
      setFormError(authErrorMessage(error));
      return;
    }
    setSent(v.email);
  });

  if (sent) {
    return (
      <Alert tone="success" title="Check your e-mail">
        If an account exists for <strong className="break-all">{sent}</strong>, a link to choose a new password is on its way. The link expires after a
        while; ask again if it does.
      </Alert>
    );
  }
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {formError ? <Alert tone="attention">{formError}</Alert> : null}
      <TextField label="E-mail" type="email" autoComplete="email" error={formState.errors.email?.message} {...register("email")} />
      <Button type="submit" busy={formState.isSubmitting} disabled={formState.isSubmitting}>
        Send reset link
      </Button>
    </form>
  );
}
