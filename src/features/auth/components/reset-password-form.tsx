import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { Link } from "react-router-dom";
import { z } from "zod";
import { passwordSchema } from "@shared/schemas/users";
import { paths } from "@/config/paths";
import { authClient, authErrorMessage } from "@/lib/auth-client";
import { Alert } from "@/components/ui/alert";
import { Button, ButtonLink } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

const schema = z
  .object({ password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ" });

export function ResetPasswordForm({ token }: { token: string | null }) {
  const [done, setDone] = useState(false);
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<z.infer<typeof schema>>({ resolver: zodResolver(schema) });

  if (!token) {
    return (
      <Alert tone="attention" title="This link is incomplete">
        Open the link from the password-reset e-mail exactly as sent, or <Link to={paths.forgotPassword()}>ask for a new link</Link>.
      </Alert>
    );
  }
  if (done) {
    return (
      <div className="space-y-4">
        <Alert tone="success" title="Password changed">
          Your new password is set. Sign in with it now.
        </Alert>
        <ButtonLink to={paths.signIn()} variant="primary">
          Sign in
        </ButtonLink>
      </div>
    );
  }

  const onSubmit = handleSubmit(async (v) => {
    setFormError(null);
    const { error } = await authClient.resetPassword({ newPassword: v.password, token });
    if (error) {
      setFormError(authErrorMessage(error));
      return;
    }
    setDone(true);
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {formError ? (
        <Alert tone="attention">
          {formError} <Link to={paths.forgotPassword()}>Ask for a new link</Link>.
        </Alert>
      ) : null}
      <TextField
        label="New password"
        type="password"
        autoComplete="new-password"
        hint="At least 12 characters."
        error={formState.errors.password?.message}
        {...register("password")}
      />
      <TextField label="Confirm password" type="password" autoComplete="new-password" error={formState.errors.confirm?.message} {...register("confirm")} />
      <Button type="submit" busy={formState.isSubmitting} disabled={formState.isSubmitting}>
        Set new password
      </Button>
    </form>
  );
}
