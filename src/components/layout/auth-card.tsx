import type { ReactNode } from "react";
import { LogoMark } from "@/components/ui/logo";
import { useDocumentTitle } from "@/lib/use-document-title";

/** Narrow centred frame for the sign-in family of pages. */
export function AuthCard({ title, intro, children, footer }: { title: string; intro?: ReactNode; children: ReactNode; footer?: ReactNode }) {
  useDocumentTitle(title);
  return (
    <div className="mx-auto w-full max-w-md">
      <div className="rounded-xl border border-line bg-surface p-6 shadow-sm sm:p-8">
        <LogoMark className="mb-4 size-10" />
        <h1 className="text-2xl font-bold tracking-tight">{title}</h1>
        {intro ? <div className="mt-1 text-muted">{intro}</div> : null}
        <div className="mt-6">{children}</div>
      </div>
      {footer ? <p className="mt-4 text-center text-[0.95rem]">{footer}</p> : null}
    </div>
  );
}
