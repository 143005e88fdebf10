import { Link } from "react-router-dom";
import type { AdminUser } from "@shared/schemas/users";
import { paths } from "@/config/paths";
import { formatUtcDate } from "@/lib/format";
import { RoleBadge } from "@/components/ui/state-badge";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { useSetAdmin } from "../api/set-admin";

export function UsersTable({ items, meId }: { items: AdminUser[]; meId: string }) {
  const setAdmin = useSetAdmin();
  return (
    <Table caption="Users">
      <thead>
        <tr>
          <Th>Name</Th>
          <Th>E-mail</Th>
          <Th>E-mail verified</Th>
          <Th>Projects and roles</Th>
          <Th>Joined (UTC)</Th>
          <Th>Administrator</Th>
        </tr>
      </thead>
      <tbody>
        {items.map((u) => (
          <Tr key={u.id}>
            <Td className="font-semibold">
              {u.name}
              {u.id === meId ? <span className="ml-1 text-sm font-normal text-muted">(you)</span> : null}
            </Td>
            <Td className="whitespace-nowrap">{u.email}</Td>
            <Td>
              {u.emailVerified ? (
                <span className="text-ok">✓ verified</span>
              ) : (
                <span className="text-signal">
                  <span aria-hidden>▲ </span>not yet
                </span>
              )}
            </Td>
            <Td>
              {u.memberships.length === 0 ? (
                <span className="text-sm text-muted">none</span>
              ) : (
                <ul className="space-y-0.5">
                  {u.memberships.map((m) => (
                    <li key={m.projectId} className="flex flex-wrap items-center gap-1.5">
                      <Link to={paths.project(m.projectId)}>{m.projectName}</Link> <RoleBadge role={m.role} />
                    </li>
                  ))}
                </ul>
              )}
            </Td>
            <Td className="num">{formatUtcDate(u.createdAt)}</Td>
            <Td>
              <label className="inline-flex cursor-pointer items-center gap-2">
                <input
                  type="checkbox"
                  className="size-4 accent-[var(--t-accent)]"
                  checked={u.isAdmin}
                  disabled={setAdmin.isPending || u.id === meId}
                  onChange={(e) => setAdmin.mutate({ id: u.id, isAdmin: e.target.checked })}
                />
                <span className="text-sm">
                  Admin<span className="sr-only"> rights for {u.name}</span>
                </span>
              </label>
              {u.id === meId ? <p className="text-xs text-muted">Ask another admin to change yours.</p> : null}
            </Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}
