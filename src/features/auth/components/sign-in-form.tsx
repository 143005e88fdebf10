import { zodResolver } from "@hookform/resolvers/zod";
import { useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { Link } from "react-router-dom";
import { z } from "zod";
import { paths } from "@/config/paths";
import { authClient, authErrorMessage } from "@/lib/auth-client";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

const signInSchema = z.object({
  email: z.email("Enter the e-mail address you signed up with"),
  password: z.string().min(1, "Enter your password"),
});
type SignInValues = z.infer<typeof signInSchema>;

export function SignInForm({ onSignedIn }: { onSignedIn: () => void }) {
  const qc = useQueryClient();
  const [formError, setFormError] = useState<string | null>(null);
  const [unverified, setUnverified] = useState(false);
  const { register, handleSubmit, formState } = useForm<SignInValues>({ resolver: zodResolver(signInSchema) });

  const onSubmit = handleSubmit(async (v) => {
    setFormError(null);
    setUnverified(false);
    const { error } = await authClient.signIn.email({ email: v.email, password: v.password });
    if (error) {
      setUnverified((error.code ?? "").toUpperCase() === "EMAIL_NOT_VERIFIED" || error.status === 403);
      setFormError(authErrorMessage(error));
      return;
    }
    await qc.invalidateQueries({ queryKey: ["me"] });
    onSignedIn();
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {formError ? (
        <Alert tone="attention" title={unverified ? "E-mail not verified" : "Sign-in failed"}>
          {formError}
        </Alert>
      ) : null}
      <TextField label="E-mail" type="email" autoComplete="email" error={formState.errors.email?.message} {...register("email")} />
      <TextField label="Password" type="password" autoComplete="current-password" error={formState.errors.password?.message} {...register("password")} />
      <div className="flex flex-wrap items-center justify-between gap-3">
        <Button type="submit" busy={formState.isSubmitting} disabled={formState.isSubmitting}>
          Sign in
        </Button>
        <Link to={paths.forgotPassword()} className="text-[0.95rem]">
          Forgot your password?
        </Link>
      </div>
    </form>
  );
}
