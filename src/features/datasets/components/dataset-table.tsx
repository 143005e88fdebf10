import { Link } from "react-router-dom";
import type { Dataset } from "@shared/schemas/datasets";
import { paths } from "@/config/paths";
import { KindLabel } from "@/components/ui/kind-label";
import { StateBadge } from "@/components/ui/state-badge";
import { Table, Td, Th, Tr } from "@/components/ui/table";

export function DatasetTable({ items }: { items: Dataset[] }) {
  return (
    <Table caption="Datasets">
      <thead>
        <tr>
          <Th>Dataset</Th>
          <Th>Platform · deployment</Th>
          <Th numeric>Versions</Th>
          <Th>Latest version</Th>
          <Th>Licence</Th>
        </tr>
      </thead>
      <tbody>
        {items.map((d) => {
          const latest = d.versions.reduce<Dataset["versions"][number] | null>((a, v) => (!a || v.number > a.number ? v : a), null);
          return (
            <Tr key={d.id}>
              <Td>
                <Link to={paths.dataset(d.id)} className="font-semibold">
                  {d.title}
                </Link>
              </Td>
              <Td>
                {d.platformName ? (
                  <>
                    <div>{d.platformName}</div>
                    <div className="text-sm text-muted">
                      <KindLabel kind={d.platformKind} /> {d.deploymentName ? `· ${d.deploymentName}` : null}
                    </div>
                  </>
                ) : (
                  <span className="text-muted">No deployment</span>
                )}
              </Td>
              <Td numeric>{d.versions.length}</Td>
              <Td>
                {latest ? (
                  <span className="inline-flex items-center gap-2">
                    <span className="num">v{latest.number}</span> <StateBadge state={latest.state} />
                  </span>
                ) : (
                  <span className="text-sm text-muted">no versions yet</span>
                )}
              </Td>
              <Td className="whitespace-nowrap">{d.licence}</Td>
            </Tr>
          );
        })}
      </tbody>
    </Table>
  );
}
