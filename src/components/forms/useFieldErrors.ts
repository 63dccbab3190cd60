/**
 * Field errors for an island's form: each message beside its field (see FieldError), the field
 * marked aria-invalid and described by its message, and the first invalid field scrolled into
 * view and focused. The server's `fields` ({ name: message }) come in through `fromAnswer`, which
 * also answers what the general message box still has to say (nothing when the message is
 * already beside its field: a message is said once).
 *
 *   // Take `attach` apart: React's lint treats whatever is passed as a ref as a ref, and then
 *   // every other use of that object during render as reading a ref.
 *   const { attach: fieldsRef, ...fe } = useFieldErrors();
 *   <form ref={fieldsRef} noValidate>
 *     <input id="still-name" … />
 *     <FieldError {...fe.error('name', 'still-name')} />
 *   const general = fe.fromAnswer(json.error);   // on a refused save; '' when already beside a field
 *
 * The input is found by its id, so any input works (a plain one, NumberField …) without
 * passing props into it; the marks are set after each render and taken off when they clear.
 */
import { useCallback, useEffect, useId, useRef, useState } from 'react';

export type FieldMessages = Record<string, string>;

/** The error part of the one JSON error shape ({ error: { code, message, fields } }). */
export interface AnswerError {
  message?: string;
  fields?: Record<string, string>;
}

export interface FieldErrorProps {
  id: string;
  /** The field's name as the server names it (`scope.name` with a scope). */
  name: string;
  message: string | undefined;
  /** The id of the input the message is about. */
  inputId: string;
}

export interface FieldErrors {
  /** The messages by field name (`scope.name` when a scope was given). */
  errors: FieldMessages;
  /** A callback ref for the element holding the fields (the form or a wrapper): the first invalid field in it is focused. */
  attach: (el: HTMLElement | null) => void;
  /** Props for <FieldError> beside the input with id `inputId`. */
  error: (name: string, inputId: string) => FieldErrorProps;
  /**
   * Show a refused answer's field messages (keys prefixed `scope.` when given, for forms with
   * several rows) and focus the first invalid field. Answers the general message still to show:
   * '' when it is one of the messages now shown beside their fields.
   */
  fromAnswer: (error: AnswerError | null | undefined, opts?: { scope?: string; fallback?: string }) => string;
  /** Set messages found before sending (checks in the browser) and focus the first. */
  set: (messages: FieldMessages) => void;
  clear: () => void;
}

function describedBy(el: HTMLElement): string[] {
  return (el.getAttribute('aria-describedby') ?? '').split(/\s+/).filter(Boolean);
}

export function useFieldErrors(): FieldErrors {
  const base = useId();
  const [errors, setErrors] = useState<FieldMessages>({});
  const [focusTick, setFocusTick] = useState(0);
  const [container, attach] = useState<HTMLElement | null>(null);
  // Inputs marked invalid by us, with the message id added to their aria-describedby (used in effects only).
  const marked = useRef(new Map<HTMLElement, string>());

  // After every render: take the old marks off, mark each input that has a message beside it.
  useEffect(() => {
    for (const [input, id] of marked.current) {
      input.removeAttribute('aria-invalid');
      const rest = describedBy(input).filter((x) => x !== id);
      if (rest.length) input.setAttribute('aria-describedby', rest.join(' '));
      else input.removeAttribute('aria-describedby');
    }
    marked.current.clear();
    if (!container) return;
    for (const p of Array.from(container.querySelectorAll<HTMLElement>('[data-field-error-for]'))) {
      const input = document.getElementById(p.dataset.fieldErrorFor ?? '');
      if (!input || !p.id || p.hidden) continue;
      input.setAttribute('aria-invalid', 'true');
      const ids = describedBy(input);
      if (!ids.includes(p.id)) input.setAttribute('aria-describedby', [p.id, ...ids].join(' '));
      marked.current.set(input, p.id);
    }
  });

  useEffect(() => {
    if (!focusTick || !container) return;
    const first = container.querySelector<HTMLElement>('[data-field-error-for]:not([hidden])');
    const input = first ? document.getElementById(first.dataset.fieldErrorFor ?? '') : null;
    if (!input) return;
    input.scrollIntoView({ block: 'center' });
    input.focus({ preventScroll: true });
  }, [focusTick, container]);

  const error = (name: string, inputId: string): FieldErrorProps => ({
    id: `${base}-${name.replace(/[^A-Za-z0-9_-]/g, '-')}-error`,
    name,
    message: errors[name],
    inputId,
  });

  const set = useCallback((messages: FieldMessages) => {
    setErrors(messages);
    if (Object.keys(messages).length) setFocusTick((n) => n + 1);
  }, []);

  const clear = useCallback(() => setErrors({}), []);

  const fromAnswer: FieldErrors['fromAnswer'] = (err, opts = {}) => {
    const messages: FieldMessages = {};
    for (const [k, v] of Object.entries(err?.fields ?? {})) messages[opts.scope ? `${opts.scope}.${k}` : k] = String(v);
    set(messages);
    const general = err?.message ?? opts.fallback ?? 'Not saved.';
    // A <FieldError> for that field is on the page (rendered empty until it has a message).
    const hasPlace = (name: string) => !!container?.querySelector(`[data-field-error-name="${CSS.escape(name)}"]`);
    return Object.entries(messages).some(([k, m]) => m === general && hasPlace(k)) ? '' : general;
  };

  return { errors, attach, error, fromAnswer, set, clear };
}
