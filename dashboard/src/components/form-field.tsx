import { useId, type InputHTMLAttributes, type ReactNode } from 'react';

/** A labelled input with its hint and its error, wired for screen readers. */
export function FormField(
  props: {
    label: string;
    error?: string;
    hint?: ReactNode;
    unit?: string;
  } & InputHTMLAttributes<HTMLInputElement>,
) {
  const { label, error, hint, unit, id: givenId, className, ...input } = props;
  const autoId = useId();
  const id = givenId ?? autoId;
  const describedBy = [error ? `${id}-error` : null, hint ? `${id}-hint` : null]
    .filter(Boolean)
    .join(' ');
  return (
    <div className={className}>
      <label htmlFor={id} className="mb-1 block text-label font-medium text-wk-ink">
        {label}
        {unit && <span className="font-normal text-wk-ink-soft"> ({unit})</span>}
      </label>
      <input
        id={id}
        className="wk-input"
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy || undefined}
        {...input}
      />
      {hint && (
        <p id={`${id}-hint`} className="mt-1 text-label text-wk-ink-soft">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="mt-1 text-label font-medium text-wk-act">
          {error}
        </p>
      )}
    </div>
  );
}

/** The form-wide error line (what the API said when no field was named). */
export function FormError(props: { message?: string }) {
  if (!props.message) return null;
  return (
    <p
      role="alert"
      className="rounded-md bg-wk-act/10 px-3 py-2 text-label font-medium text-wk-act"
    >
      {props.message}
    </p>
  );
}
