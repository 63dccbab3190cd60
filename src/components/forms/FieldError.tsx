import type { FieldErrorProps } from './useFieldErrors';

/**
 * A field's message, beside the field. Always rendered (hidden while empty) so the form knows the
 * field has a place for its message; useFieldErrors marks the input (by `inputId`) aria-invalid and
 * described by the message, and focuses the first one.
 */
export default function FieldError({ id, name, message, inputId }: FieldErrorProps) {
  return (
    <p className="field-error" id={id} data-field-error-for={inputId} data-field-error-name={name} hidden={!message}>
      {message}
    </p>
  );
}
