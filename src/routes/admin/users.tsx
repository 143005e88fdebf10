import { getErrorMessage } from "@/lib/api-client";
import { useMe } from "@/lib/session";
import { Alert } from "@/components/ui/alert";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { useAdminUsers } from "@/features/admin/api/get-users";
import { UsersTable } from "@/features/admin/components/users-table";

export function Component() {
  const { data, isPending, error } = useAdminUsers();
  const { data: me } = useMe();
  return (
    <>
      <PageHeader
        title="Users"
        description="Everyone with a Tauline account. Project roles are given on each project's page under Members; administrator rights here."
      />
      {isPending ? (
        <Loading label="Loading users…" />
      ) : error ? (
        <Alert tone="attention" title="Users could not be loaded">
          {getErrorMessage(error)}
        </Alert>
      ) : data.items.length === 0 ? (
        <EmptyState title="No users yet">People appear here once they create an account.</EmptyState>
      ) : (
        <UsersTable items={data.items} meId={me?.user.id ?? ""} />
      )}
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
