import type { ComponentProps, ReactNode } from "react";

const control =
  "block w-full rounded-md border border-line bg-white px-3 py-2 text-sm text-ink placeholder:text-muted/70 " +
  "focus:border-ink-soft focus:outline-none focus:ring-2 focus:ring-copper/30 aria-[invalid=true]:border-danger";

/** A labelled form field with its hint and its error, wired for screen readers. */
export function Field({
  label,
  name,
  hint,
  error,
  unit,
  children,
}: {
  label: string;
  name: string;
  hint?: ReactNode;
  error?: string[];
  unit?: string;
  children: ReactNode;
}) {
  return (
    <div className="space-y-1.5">
      <label htmlFor={name} className="flex items-baseline justify-between text-sm font-medium text-ink">
        <span>{label}</span>
        {unit ? <span className="num text-xs font-normal text-muted">{unit}</span> : null}
      </label>
      {children}
      {error?.length ? (
        <p id={`${name}-error`} className="text-xs text-danger" role="alert">
          {error.join(" ")}
        </p>
      ) : hint ? (
        <p id={`${name}-hint`} className="text-xs text-muted">
          {hint}
        </p>
      ) : null}
    </div>
  );
}

export function Input({ error, className = "", ...props }: ComponentProps<"input"> & { error?: string[] }) {
  const name = props.name ?? props.id;
  return (
    <input
      id={props.id ?? name}
      aria-invalid={error?.length ? true : undefined}
      aria-describedby={name ? `${name}-${error?.length ? "error" : "hint"}` : undefined}
      className={`${control} ${className}`}
      {...props}
    />
  );
}

export function Textarea({ error, className = "", ...props }: ComponentProps<"textarea"> & { error?: string[] }) {
  return (
    <textarea
      id={props.id ?? props.name}
      aria-invalid={error?.length ? true : undefined}
      className={`${control} min-h-20 ${className}`}
      {...props}
    />
  );
}

export function Select({ error, className = "", children, ...props }: ComponentProps<"select"> & { error?: string[] }) {
  return (
    <select
      id={props.id ?? props.name}
      aria-invalid={error?.length ? true : undefined}
      className={`${control} ${className}`}
      {...props}
    >
      {children}
    </select>
  );
}
