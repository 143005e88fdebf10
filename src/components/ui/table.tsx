import clsx from "clsx";
import type { ComponentProps, ReactNode } from "react";

/** Dense data table. Numeric columns are right-aligned with their unit in the header. */
export function Table({ caption, children, className }: { caption: ReactNode; children: ReactNode; className?: string }) {
  return (
    <div className={clsx("overflow-x-auto rounded-lg border border-line bg-surface", className)}>
      <table className="w-full min-w-[40rem] border-collapse text-[0.95rem]">
        <caption className="sr-only">{caption}</caption>
        {children}
      </table>
    </div>
  );
}

export function Th({ numeric, unit, children, className, ...rest }: ComponentProps<"th"> & { numeric?: boolean; unit?: string }) {
  return (
    <th
      scope="col"
      className={clsx(
        "whitespace-nowrap border-b border-line bg-sunken px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-muted",
        numeric && "text-right",
        className,
      )}
      {...rest}
    >
      {children}
      {unit ? <span className="ml-1 normal-case tracking-normal">({unit})</span> : null}
    </th>
  );
}

export function Td({ numeric, children, className, ...rest }: ComponentProps<"td"> & { numeric?: boolean }) {
  return (
    <td className={clsx("border-b border-line/70 px-3 py-2 align-top", numeric && "num whitespace-nowrap text-right", className)} {...rest}>
      {children}
    </td>
  );
}

export function Tr({ className, ...rest }: ComponentProps<"tr">) {
  return <tr className={clsx("last:[&>td]:border-b-0 hover:bg-sunken/60", className)} {...rest} />;
}
