import { Link } from "react-router-dom";
import type { Project } from "@shared/schemas/projects";
import { paths } from "@/config/paths";
import { RoleBadge } from "@/components/ui/state-badge";

export function ProjectList({ items }: { items: Project[] }) {
  return (
    <ul className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
      {items.map((p) => (
        <li key={p.id} className="flex flex-col rounded-lg border border-line bg-surface p-4 hover:border-accent">
          <div className="flex items-start justify-between gap-2">
            <h2 className="text-lg font-semibold leading-snug">
              <Link to={paths.project(p.id)}>{p.name}</Link>
            </h2>
            {p.myRole ? <RoleBadge role={p.myRole} /> : null}
          </div>
          <p className="num text-xs text-muted">{p.slug}</p>
          {p.description ? <p className="mt-2 line-clamp-3 text-[0.95rem] text-muted">{p.description}</p> : null}
          {p.counts ? (
            <dl className="mt-auto grid grid-cols-3 gap-2 pt-3 text-sm">
              {(
                [
                  ["Platforms", p.counts.platforms],
                  ["Datasets", p.counts.datasets],
                  ["Members", p.counts.members],
                ] as const
              ).map(([k, n]) => (
                <div key={k}>
                  <dt className="text-muted">{k}</dt>
                  <dd className="num text-base">{n}</dd>
                </div>
              ))}
            </dl>
          ) : null}
        </li>
      ))}
    </ul>
  );
}
