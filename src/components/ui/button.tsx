import clsx from "clsx";
import type { ComponentProps } from "react";
import { Link } from "react-router-dom";

type Variant = "primary" | "secondary" | "ghost" | "attention";
type Size = "sm" | "md";

const base =
  "inline-flex items-center justify-center gap-1.5 rounded-md font-semibold transition-colors disabled:cursor-not-allowed disabled:opacity-55 no-underline";
const variants: Record<Variant, string> = {
  primary: "bg-accent text-accent-fg hover:bg-accent-hover hover:text-accent-fg",
  secondary: "border border-field bg-surface text-fg hover:bg-sunken hover:text-fg",
  ghost: "text-accent hover:bg-sunken",
  attention: "border border-signal text-signal bg-surface hover:bg-signal-soft",
};
const sizes: Record<Size, string> = {
  sm: "px-2.5 py-1 text-sm",
  md: "px-3.5 py-2 text-[0.95rem]",
};

export function buttonClass(variant: Variant = "primary", size: Size = "md", className?: string) {
  return clsx(base, variants[variant], sizes[size], className);
}

export function Button({
  variant = "primary",
  size = "md",
  className,
  type = "button",
  busy,
  children,
  ...rest
}: ComponentProps<"button"> & { variant?: Variant; size?: Size; busy?: boolean }) {
  return (
    <button type={type} className={buttonClass(variant, size, className)} aria-busy={busy || undefined} {...rest}>
      {busy ? <span aria-hidden className="size-3.5 animate-spin rounded-full border-2 border-current border-t-transparent" /> : null}
      {children}
    </button>
  );
}

export function ButtonLink({
  variant = "secondary",
  size = "md",
  className,
  ...rest
}: ComponentProps<typeof Link> & { variant?: Variant; size?: Size }) {
  return <Link className={buttonClass(variant, size, className)} {...rest} />;
}
