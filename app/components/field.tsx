/** A labelled form field with its error beside it; the typed value is kept when the form comes back with errors. */
export function Field(props: {
  name: string;
  label: string;
  type?: string;
  value?: string;
  error?: string;
  autoComplete?: string;
  hint?: string;
  required?: boolean;
  minLength?: number;
}) {
  const { name, label, type = "text", value, error, autoComplete, hint, required, minLength } = props;
  const describedBy = [hint ? `${name}-hint` : null, error ? `${name}-error` : null].filter(Boolean).join(" ") || undefined;
  return (
    <div>
      <label htmlFor={name} className="block text-sm font-semibold">
        {label}
      </label>
      <input
        id={name}
        name={name}
        type={type}
        defaultValue={type === "password" ? undefined : value}
        autoComplete={autoComplete}
        required={required}
        minLength={minLength}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`mt-1 block w-full max-w-md rounded border-2 px-3 py-2 text-base ${error ? "border-signal" : "border-ink"}`}
      />
      {hint ? (
        <p id={`${name}-hint`} className="mt-1 text-sm text-muted">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${name}-error`} className="mt-1 text-sm font-semibold text-signal-dark">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** A form-level message (error or notice) announced to screen readers. */
export function FormMessage({ error, notice }: { error?: string; notice?: string }) {
  if (error)
    return (
      <p role="alert" className="rounded border-l-4 border-signal bg-white px-3 py-2 font-semibold text-signal-dark">
        {error}
      </p>
    );
  if (notice)
    return (
      <p role="status" className="rounded border-l-4 border-ink bg-white px-3 py-2">
        {notice}
      </p>
    );
  return null;
}
