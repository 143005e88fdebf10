import { useSearchParams } from "react-router-dom";
import { paths } from "@/config/paths";
import { useMe } from "@/lib/session";
import { AuthCard } from "@/components/layout/auth-card";
import { Alert } from "@/components/ui/alert";
import { ButtonLink } from "@/components/ui/button";

export function Component() {
  const [params] = useSearchParams();
  const { data: me } = useMe();
  const error = params.get("error");
  if (error) {
    return (
      <AuthCard title="This link did not work">
        <Alert tone="attention" title="Verification failed">
          The link is invalid or has expired ({error.toLowerCase().replace(/_/g, " ")}). Sign in to have a new verification e-mail sent, or ask an
          administrator.
        </Alert>
        <ButtonLink className="mt-4" variant="primary" to={paths.signIn()}>
          Go to sign-in
        </ButtonLink>
      </AuthCard>
    );
  }
  return (
    <AuthCard title="E-mail address confirmed">
      <Alert tone="success" title="Your account is active">
        {me ? "You are signed in." : "You can now sign in."} To work in an observing project, ask a Tauline administrator to add you to it as a contributor or curator.
      </Alert>
      <ButtonLink className="mt-4" variant="primary" to={me ? paths.projects() : paths.signIn()}>
        {me ? "Go to my projects" : "Sign in"}
      </ButtonLink>
    </AuthCard>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
