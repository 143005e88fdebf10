import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { z } from "zod";
import { passwordSchema } from "@shared/schemas/users";
import { paths } from "@/config/paths";
import { authClient, authErrorMessage } from "@/lib/auth-client";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

const signUpSchema = z
  .object({
    name: z.string().trim().min(2, "Enter your name (at least 2 characters)").max(120, "At most 120 characters"),
    email: z.email("Enter a valid e-mail address"),
    password: passwordSchema,
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ" });
type SignUpValues = z.infer<typeof signUpSchema>;

export function SignUpForm() {
  const [sentTo, setSentTo] = useState<string | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<SignUpValues>({ resolver: zodResolver(signUpSchema) });

  const onSubmit = handleSubmit(async (v) => {
    setFormError(null);
    const { error } = await authClient.signUp.email({ name: v.name, email: v.email, password: v.password, callbackURL: paths.verified() });
    if (error) {
      setFormError(authErrorMessage(error));
      return;
    }
    setSentTo(v.email);
  });

  if (sentTo) {
    return (
      <Alert tone="success" title="Check your e-mail">
        <p>
          We sent a verification link to <strong className="break-all">{sentTo}</strong>. Open it to activate your account, then sign in. The link
          works once.
        </p>
        <p className="mt-2 text-sm text-muted">Nothing arrived after a few minutes? Check your spam folder, or ask your Tauline administrator.</p>
      </Alert>
    );
  }

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {formError ? (
        <Alert tone="attention" title="Account not created">
          {formError}
        </Alert>
      ) : null}
      <TextField label="Name" autoComplete="name" error={formState.errors.name?.message} {...register("name")} />
      <TextField label="E-mail" type="email" autoComplete="email" error={formState.errors.email?.message} {...register("email")} />
      <TextField
        label="Password"
        type="password"
        autoComplete="new-password"
        hint="At least 12 characters. A few unrelated words make a strong one."
        error={formState.errors.password?.message}
        {...register("password")}
      />
      <TextField label="Confirm password" type="password" autoComplete="new-password" error={formState.errors.confirm?.message} {...register("confirm")} />
      <Button type="submit" busy={formState.isSubmitting} disabled={formState.isSubmitting}>
        Create account
      </Button>
    </form>
  );
}
