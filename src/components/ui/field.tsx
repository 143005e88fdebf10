import clsx from "clsx";
import { useId, type ComponentProps, type ReactNode } from "react";

const control =
  "block w-full rounded-md border border-field bg-surface px-3 py-2 text-fg placeholder:text-muted/80 aria-[invalid=true]:border-signal aria-[invalid=true]:border-2";

type FieldFrameProps = { label: ReactNode; hint?: ReactNode; error?: string; className?: string };

function useFieldIds(error?: string, hint?: ReactNode) {
  const id = useId();
  const hintId = hint ? `${id}-hint` : undefined;
  const errorId = error ? `${id}-error` : undefined;
  const describedBy = [hintId, errorId].filter(Boolean).join(" ") || undefined;
  return { id, hintId, errorId, describedBy };
}

function Frame({
  id,
  label,
  hint,
  hintId,
  error,
  errorId,
  className,
  children,
}: FieldFrameProps & { id: string; hintId?: string; errorId?: string; children: ReactNode }) {
  return (
    <div className={clsx("flex flex-col gap-1", className)}>
      <label htmlFor={id} className="text-sm font-semibold">
        {label}
      </label>
      {children}
      {hint ? (
        <p id={hintId} className="text-sm text-muted">
          {hint}
        </p>
      ) : null}
      {error ? <FieldError id={errorId}>{error}</FieldError> : null}
    </div>
  );
}

export function FieldError({ id, children }: { id?: string; children: ReactNode }) {
  return (
    <p id={id} className="flex items-start gap-1 text-sm font-semibold text-signal">
      <svg aria-hidden viewBox="0 0 16 16" className="mt-[3px] size-3.5 shrink-0 fill-current">
        <path d="M8 1 15 14H1z" />
        <rect x="7.25" y="5.5" width="1.5" height="4.5" fill="var(--t-surface)" />
        <rect x="7.25" y="11" width="1.5" height="1.5" fill="var(--t-surface)" />
      </svg>
      <span>{children}</span>
    </p>
  );
}

export function TextField({ label, hint, error, className, inputClassName, ...input }: FieldFrameProps & ComponentProps<"input"> & { inputClassName?: string }) {
  const ids = useFieldIds(error, hint);
  return (
    <Frame {...ids} label={label} hint={hint} error={error} className={className}>
      <input id={ids.id} aria-invalid={error ? true : undefined} aria-describedby={ids.describedBy} className={clsx(control, inputClassName)} {...input} />
    </Frame>
  );
}

export function TextareaField({ label, hint, error, className, ...input }: FieldFrameProps & ComponentProps<"textarea">) {
  const ids = useFieldIds(error, hint);
  return (
    <Frame {...ids} label={label} hint={hint} error={error} className={className}>
      <textarea id={ids.id} rows={3} aria-invalid={error ? true : undefined} aria-describedby={ids.describedBy} className={control} {...input} />
    </Frame>
  );
}

export function SelectField({
  label,
  hint,
  error,
  className,
  options,
  ...input
}: FieldFrameProps & ComponentProps<"select"> & { options: { value: string; label: string }[] }) {
  const ids = useFieldIds(error, hint);
  return (
    <Frame {...ids} label={label} hint={hint} error={error} className={className}>
      <select id={ids.id} aria-invalid={error ? true : undefined} aria-describedby={ids.describedBy} className={control} {...input}>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </Frame>
  );
}
