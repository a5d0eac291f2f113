import { useRef, useState, type SubmitEvent } from 'react';
import type { z } from 'zod';
import { fieldErrors, serverErrors } from './api';

/** Messages by field name; `form` holds the message for the form as a whole. */
export type FormErrors = Record<string, string>;

export interface ZodFormOptions<Schema extends z.ZodType> {
  /** The form's schema from src/lib/validation: the same rules the server applies. */
  schema: Schema;
  /** Fields a server error's `path` may name; an error about anything else belongs to the whole form. */
  fields: readonly string[];
  /** What to validate; the form's named controls by default. */
  read?: (form: HTMLFormElement) => unknown | Promise<unknown>;
  /** Sends the valid input; resolves to messages to show when it was refused without throwing, nothing on success. */
  submit: (input: z.output<Schema>, form: HTMLFormElement) => Promise<FormErrors | void>;
}

/** How one submit ended: the messages to show, whether it succeeded, and what it threw (null when nothing). */
export interface FormOutcome {
  errors: FormErrors;
  succeeded: boolean;
  failure: unknown;
}

/**
 * One submit without React state: reads and validates the input, and only when it is valid calls
 * `onSending` and sends it; a thrown error's `path` lands on its field (else on the form).
 */
export async function runZodForm<Schema extends z.ZodType>(
  { schema, fields, read, submit }: ZodFormOptions<Schema>,
  form: HTMLFormElement,
  onSending: () => void = () => {},
): Promise<FormOutcome> {
  const parsed = schema.safeParse(read ? await read(form) : Object.fromEntries(new FormData(form)));
  if (!parsed.success) return { errors: fieldErrors(parsed.error.issues), succeeded: false, failure: null };
  onSending();
  try {
    const refused = await submit(parsed.data, form);
    return refused ? { errors: refused, succeeded: false, failure: null } : { errors: {}, succeeded: true, failure: null };
  } catch (error) {
    return { errors: serverErrors(error, fields), succeeded: false, failure: error };
  }
}

export interface ZodForm extends FormOutcome {
  onSubmit: (event: SubmitEvent<HTMLFormElement>) => Promise<void>;
  /** True while the input is being sent. */
  submitting: boolean;
  /** Forgets messages, success and failure, e.g. when a dialog opens again. */
  reset: () => void;
}

const IDLE: FormOutcome = { errors: {}, succeeded: false, failure: null };

/**
 * The one form helper for the zod-validated forms: validates with the form's schema, shows field
 * messages by path, maps a server error's `path` onto its field, and tracks submitting.
 * `succeeded` stays true after a successful submit until the next one starts.
 */
export function useZodForm<Schema extends z.ZodType>(options: ZodFormOptions<Schema>): ZodForm {
  const [outcome, setOutcome] = useState<FormOutcome>(IDLE);
  const [submitting, setSubmitting] = useState(false);
  // A second submit while one is in flight is ignored, even before the re-render disables the button.
  const inFlight = useRef(false);

  async function onSubmit(event: SubmitEvent<HTMLFormElement>) {
    event.preventDefault();
    if (inFlight.current) return;
    inFlight.current = true;
    const form = event.currentTarget;
    setOutcome((last) => ({ ...last, succeeded: false, failure: null }));
    try {
      setOutcome(
        await runZodForm(options, form, () => {
          setOutcome(IDLE);
          setSubmitting(true);
        }),
      );
    } finally {
      inFlight.current = false;
      setSubmitting(false);
    }
  }

  return { ...outcome, onSubmit, submitting, reset: () => setOutcome(IDLE) };
}
