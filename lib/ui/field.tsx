import type { InputHTMLAttributes, ReactNode, TextareaHTMLAttributes } from "react";

/*
 * Form primitives shared by every feature's forms: a labelled control whose hint and error
 * are tied to it with aria-describedby, so screen readers read the message with the field.
 */

type Common = { name: string; label: string; hint?: ReactNode; errors?: string[] | undefined; unit?: string };

function describedBy(name: string, hint: unknown, errors: string[] | undefined): string | undefined {
  const ids = [hint ? `${name}-hint` : null, errors?.length ? `${name}-error` : null].filter(Boolean);
  return ids.length ? ids.join(" ") : undefined;
}

function FieldFrame({ name, label, hint, errors, children }: Common & { children: ReactNode }) {
  return (
    <div className="space-y-1.5">
      <label htmlFor={name} className="block text-sm font-medium text-ink">
        {label}
      </label>
      {children}
      {hint ? (
        <p id={`${name}-hint`} className="text-xs text-ink-muted">
          {hint}
        </p>
      ) : null}
      {errors?.length ? (
        <p id={`${name}-error`} className="flex gap-1.5 text-sm text-red-700 dark:text-red-300">
          <span aria-hidden="true">!</span>
          <span>{errors.join(" ")}</span>
        </p>
      ) : null}
    </div>
  );
}

/** A labelled input; `unit` is shown inside the field's right edge. */
export function Field({
  name,
  label,
  hint,
  errors,
  unit,
  ...input
}: Common & Omit<InputHTMLAttributes<HTMLInputElement>, "name">) {
  return (
    <FieldFrame name={name} label={label} hint={hint} errors={errors}>
      <div className="relative">
        <input
          id={name}
          name={name}
          aria-invalid={errors?.length ? true : undefined}
          aria-describedby={describedBy(name, hint, errors)}
          className={`field-input ${unit ? "pr-12" : ""}`}
          {...input}
        />
        {unit ? (
          <span
            aria-hidden="true"
            className="pointer-events-none absolute inset-y-0 right-3 flex items-center font-mono text-xs text-ink-muted"
          >
            {unit}
          </span>
        ) : null}
      </div>
    </FieldFrame>
  );
}

/** A labelled multi-line text field. */
export function TextArea({
  name,
  label,
  hint,
  errors,
  ...area
}: Common & Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, "name">) {
  return (
    <FieldFrame name={name} label={label} hint={hint} errors={errors}>
      <textarea
        id={name}
        name={name}
        aria-invalid={errors?.length ? true : undefined}
        aria-describedby={describedBy(name, hint, errors)}
        className="field-input min-h-24"
        {...area}
      />
    </FieldFrame>
  );
}

/** A message about the whole form (role problems, conflicts), announced when it appears. */
export function FormMessage({ tone, children }: { tone: "error" | "info"; children: ReactNode }) {
  if (!children) return null;
  const look =
    tone === "error"
      ? "border-red-300 bg-red-50 text-red-800 dark:border-red-800 dark:bg-red-950/50 dark:text-red-200"
      : "border-dusk-200 bg-dusk-50 text-dusk-800 dark:border-dusk-700 dark:bg-dusk-900/60 dark:text-dusk-100";
  return (
    <div
      role={tone === "error" ? "alert" : "status"}
      className={`rounded-lg border px-3 py-2 text-sm ${look}`}
    >
      {children}
    </div>
  );
}
