import type { Annotation } from "@shared/schemas/annotations";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { FlagBadge, type QcFlag } from "@/components/ui/flag-badge";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { formatUtc } from "@/lib/format";
import { showToast } from "@/lib/toast";
import { useDeleteAnnotation } from "../api/annotations";

/** The dataset's annotations, oldest stretch first, with their manual flags and reasons. */
export function AnnotationList({
  datasetId,
  items,
  labels,
  canEdit,
  onEdit,
  onShow,
}: {
  datasetId: string;
  items: Annotation[];
  labels: Record<string, { label: string }>;
  canEdit: boolean;
  onEdit: (a: Annotation) => void;
  onShow: (a: Annotation) => void;
}) {
  const del = useDeleteAnnotation(datasetId);
  if (!items.length)
    return (
      <EmptyState title="No annotations yet">
        {canEdit ? "Choose “Drag to mark a stretch” above the plots, drag across a plot, then write a note or set a manual flag." : "Members of the project add notes and manual flags here."}
      </EmptyState>
    );
  return (
    <Table caption="Annotations and manual flags" className="min-w-0">
      <thead>
        <tr>
          <Th>From (UTC)</Th>
          <Th>To (UTC)</Th>
          <Th>Variables</Th>
          <Th>Flag</Th>
          <Th>Note and reason</Th>
          <Th>By</Th>
          <Th>
            <span className="sr-only">Actions</span>
          </Th>
        </tr>
      </thead>
      <tbody data-testid="annotation-rows">
        {items.map((a) => (
          <Tr key={a.id}>
            <Td className="num whitespace-nowrap">{formatUtc(a.from, true)}</Td>
            <Td className="num whitespace-nowrap">{formatUtc(a.to, true)}</Td>
            <Td>{a.variables.map((v) => labels[v]?.label ?? v).join(", ")}</Td>
            <Td>{a.flag ? <FlagBadge flag={a.flag as QcFlag} /> : <span className="text-muted">note</span>}</Td>
            <Td>
              {a.note ? <p>{a.note}</p> : null}
              {a.reason ? <p className="text-sm text-muted">Reason: {a.reason}</p> : null}
            </Td>
            <Td className="whitespace-nowrap text-sm">
              {a.createdBy ?? "—"}
              <div className="num text-muted">{formatUtc(a.updatedAt)}</div>
            </Td>
            <Td className="whitespace-nowrap">
              <Button size="sm" variant="ghost" onClick={() => onShow(a)}>
                Show
              </Button>
              {canEdit ? (
                <>
                  <Button size="sm" variant="ghost" onClick={() => onEdit(a)}>
                    Edit
                  </Button>
                  <Button
                    size="sm"
                    variant="ghost"
                    onClick={() => {
                      if (!confirm(a.flag ? "Delete this annotation? Its manual flag is removed and the automatic flags come back." : "Delete this note?")) return;
                      del.mutate(a.id, { onSuccess: (r) => showToast(r?.note ?? (r?.applied ? `Removed; ${r.applied.rowsChanged} values of version ${r.applied.versionNumber} changed back.` : "Removed."), "success") });
                    }}
                  >
                    Delete
                  </Button>
                </>
              ) : null}
            </Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}
