import { Link } from "react-router-dom";
import type { Platform } from "@shared/schemas/platforms";
import { paths } from "@/config/paths";
import { KindLabel } from "@/components/ui/kind-label";
import { Table, Td, Th, Tr } from "@/components/ui/table";

export function PlatformTable({ items }: { items: Platform[] }) {
  return (
    <Table caption="Platforms">
      <thead>
        <tr>
          <Th>Platform</Th>
          <Th>Type</Th>
          <Th>WMO number</Th>
          <Th numeric>Deployments</Th>
        </tr>
      </thead>
      <tbody>
        {items.map((p) => (
          <Tr key={p.id}>
            <Td>
              <Link to={paths.platform(p.id)} className="font-semibold">
                {p.name}
              </Link>
              {p.description ? <div className="line-clamp-1 text-sm text-muted">{p.description}</div> : null}
            </Td>
            <Td>
              <KindLabel kind={p.kind} />
            </Td>
            <Td className="num">{p.wmoNumber ?? "—"}</Td>
            <Td numeric>{p.deploymentCount ?? "—"}</Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}
