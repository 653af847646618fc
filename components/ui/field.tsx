/** A labelled form field with its error text, wired for screen readers. */
export function Field({
  label,
  name,
  error,
  hint,
  children,
}: {
  label: string;
  name: string;
  error?: string[] | string;
  hint?: string;
  children: React.ReactNode;
}) {
  const message = Array.isArray(error) ? error[0] : error;
  return (
    <div className="space-y-1.5">
      <label htmlFor={name} className="block text-sm font-medium text-ink">
        {label}
      </label>
      {children}
      {hint && !message && (
        <p id={`${name}-hint`} className="text-xs text-ink-muted">
          {hint}
        </p>
      )}
      {message && (
        <p id={`${name}-error`} className="text-xs font-medium text-danger">
          {message}
        </p>
      )}
    </div>
  );
}

export const inputClass =
  "block w-full rounded-md border border-rule bg-surface px-3 py-2 text-sm text-ink shadow-sm placeholder:text-ink-muted/70 focus:border-accent focus:outline-none focus:ring-2 focus:ring-accent/25 disabled:opacity-60";

export const buttonClass =
  "inline-flex items-center justify-center gap-2 rounded-md bg-accent px-4 py-2 text-sm font-medium text-white shadow-sm hover:bg-accent-strong disabled:cursor-wait disabled:opacity-70";

export const quietButtonClass =
  "inline-flex items-center justify-center gap-2 rounded-md border border-rule bg-surface px-3 py-1.5 text-sm font-medium text-ink hover:bg-paper disabled:opacity-60";
