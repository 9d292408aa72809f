import { useEffect, useId, useRef, useState } from "react";

type InputProps = React.InputHTMLAttributes<HTMLInputElement>;

/** A labelled input whose error is announced and tied to the input for screen readers. */
export function Field({
  label,
  error,
  hint,
  className = "",
  ...input
}: InputProps & { label: string; error?: string; hint?: string; name: string }) {
  const id = useId();
  // An error speaks of the value that was sent. Once the field is edited it no longer applies and goes away; the
  // next submit shows whatever the server says then.
  const ref = useRef<HTMLInputElement>(null);
  const [edited, setEdited] = useState(false);
  useEffect(() => {
    const form = ref.current?.form;
    if (!form) return;
    const reset = () => setEdited(false);
    form.addEventListener("submit", reset);
    return () => form.removeEventListener("submit", reset);
  }, []);
  // A new message from the server shows again even if the field was edited since the last one.
  const [seenError, setSeenError] = useState(error);
  if (seenError !== error) {
    setSeenError(error);
    setEdited(false);
  }
  if (edited) error = undefined;
  const errorId = `${id}-error`;
  const hintId = `${id}-hint`;
  return (
    <div className={`flex flex-col gap-1 ${className}`}>
      <label htmlFor={id} className="text-sm font-medium">
        {label}
      </label>
      <input
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={[error ? errorId : null, hint ? hintId : null].filter(Boolean).join(" ") || undefined}
        className={`rounded-lg border bg-white px-3 py-2 text-base shadow-sm outline-none focus:border-teal focus:ring-2 focus:ring-teal/30 ${
          error ? "border-brick" : "border-line"
        }`}
        {...input}
        ref={ref}
        onChange={(e) => {
          input.onChange?.(e);
          setEdited(true);
        }}
      />
      {hint && !error && (
        <p id={hintId} className="text-xs text-ink-soft">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} role="alert" className="text-sm text-brick">
          {error}
        </p>
      )}
    </div>
  );
}

export function SelectField({
  label,
  error,
  children,
  className = "",
  ...select
}: React.SelectHTMLAttributes<HTMLSelectElement> & { label: string; error?: string; name: string }) {
  const id = useId();
  return (
    <div className={`flex flex-col gap-1 ${className}`}>
      <label htmlFor={id} className="text-sm font-medium">
        {label}
      </label>
      <select
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className={`rounded-lg border bg-white px-3 py-2 text-base shadow-sm focus:border-teal ${error ? "border-brick" : "border-line"}`}
        {...select}
      >
        {children}
      </select>
      {error && (
        <p id={`${id}-error`} role="alert" className="text-sm text-brick">
          {error}
        </p>
      )}
    </div>
  );
}

export function FormMessage({ tone = "error", children }: { tone?: "error" | "ok"; children: React.ReactNode }) {
  return (
    <div
      role={tone === "error" ? "alert" : "status"}
      className={`rounded-lg border px-4 py-3 text-sm ${
        tone === "error" ? "border-brick/40 bg-brick/10 text-brick" : "border-teal/40 bg-teal/10 text-teal-dark"
      }`}
    >
      {children}
    </div>
  );
}
