import { useEffect, useRef, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from "react";
import { useNavigation } from "react-router";

type FieldProps = InputHTMLAttributes<HTMLInputElement> & { label: string; name: string; error?: string; hint?: ReactNode };

/** What a labelled control needs: its id, and the attributes that tie its error to it for screen readers. */
function controlAttrs(name: string, id: string | undefined, error: string | undefined) {
  const fieldId = id ?? `f-${name}`;
  return {
    id: fieldId,
    name,
    className: "field",
    "aria-invalid": error ? true : undefined,
    "aria-describedby": error ? `${fieldId}-error` : undefined,
  } as const;
}

/** The frame every labelled control shares: the label above, a hint or the error below. */
function FieldFrame({
  label,
  fieldId,
  error,
  hint,
  className,
  children,
}: {
  label: string;
  fieldId: string;
  error?: string;
  hint?: ReactNode;
  className?: string;
  children: ReactNode;
}) {
  return (
    <div className={className}>
      <label htmlFor={fieldId} className="label">
        {label}
      </label>
      {children}
      {hint && !error && <p className="mt-1 text-sm text-graphite-soft">{hint}</p>}
      {error && (
        <p id={`${fieldId}-error`} className="field-error" role="alert">
          {error}
        </p>
      )}
    </div>
  );
}

/** A labelled input with its error message tied to it for screen readers. */
export function Field({ label, name, error, hint, id, ...rest }: FieldProps) {
  const attrs = controlAttrs(name, id, error);
  return (
    <FieldFrame label={label} fieldId={attrs.id} error={error} hint={hint}>
      <input {...attrs} {...rest} />
    </FieldFrame>
  );
}

type TextAreaProps = TextareaHTMLAttributes<HTMLTextAreaElement> & {
  label: string;
  name: string;
  error?: string;
  wrapperClassName?: string;
};

/** A labelled text area (notes and the like), its error tied to it like Field's. */
export function TextAreaField({ label, name, error, id, wrapperClassName, ...rest }: TextAreaProps) {
  const attrs = controlAttrs(name, id, error);
  return (
    <FieldFrame label={label} fieldId={attrs.id} error={error} className={wrapperClassName}>
      <textarea {...attrs} {...rest} />
    </FieldFrame>
  );
}

type SelectProps = SelectHTMLAttributes<HTMLSelectElement> & { label: string; name: string; error?: string; children: ReactNode };

export function SelectField({ label, name, error, id, children, ...rest }: SelectProps) {
  const attrs = controlAttrs(name, id, error);
  return (
    <FieldFrame label={label} fieldId={attrs.id} error={error}>
      <select {...attrs} {...rest}>
        {children}
      </select>
    </FieldFrame>
  );
}

export function FormError({ message }: { message?: string }) {
  if (!message) return null;
  return (
    <div
      role="alert"
      tabIndex={-1}
      data-form-error
      className="rounded-md border border-spec-red/40 bg-spec-red-soft px-4 py-3 text-sm text-spec-red"
    >
      {message}
    </div>
  );
}

/**
 * After a form comes back from the server with errors, focus moves to the first field in
 * error (or to the form's own error message), so a keyboard or screen-reader user lands where
 * the fix is instead of on the button they pressed. Mounted once by the shell and the
 * sign-in card; it acts only when a submission has just finished.
 */
export function FocusFirstError() {
  const state = useNavigation().state;
  const submitted = useRef(false);
  useEffect(() => {
    if (state === "submitting") submitted.current = true;
    if (state !== "idle" || !submitted.current) return;
    submitted.current = false;
    const first = document.querySelector<HTMLElement>('main [aria-invalid="true"], main [data-form-error]');
    first?.focus();
  }, [state]);
  return null;
}
