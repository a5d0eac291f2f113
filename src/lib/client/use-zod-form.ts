import { useRef, useState, type FormEvent } from 'react';
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

export interface ZodForm {
  onSubmit: (event: FormEvent<HTMLFormElement>) => Promise<void>;
  errors: FormErrors;
  /** True while the input is being sent. */
  submitting: boolean;
  /** True after the last submit succeeded, until the next one starts. */
  succeeded: boolean;
  /** The error the last submit threw (an ApiError carries the whole error body), or null. */
  failure: unknown;
  /** Forgets messages, success and failure, e.g. when a dialog opens again. */
  reset: () => void;
}

/**
 * The one form helper for the zod-validated forms: validates with the form's schema, shows field
 * messages by path, maps a server error's `path` onto its field, and tracks submitting.
 */
export function useZodForm<Schema extends z.ZodType>({ schema, fields, read, submit }: ZodFormOptions<Schema>): ZodForm {
  const [errors, setErrors] = useState<FormErrors>({});
  const [submitting, setSubmitting] = useState(false);
  const [succeeded, setSucceeded] = useState(false);
  const [failure, setFailure] = useState<unknown>(null);
  // A second submit while one is in flight is ignored, even before the re-render disables the button.
  const inFlight = useRef(false);

  async function onSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (inFlight.current) return;
    const form = event.currentTarget;
    setSucceeded(false);
    setFailure(null);
    const parsed = schema.safeParse(read ? await read(form) : Object.fromEntries(new FormData(form)));
    if (!parsed.success) {
      setErrors(fieldErrors(parsed.error.issues));
      return;
    }
    setErrors({});
    inFlight.current = true;
    setSubmitting(true);
    try {
      const refused = await submit(parsed.data, form);
      if (refused) setErrors(refused);
      else setSucceeded(true);
    } catch (error) {
      setFailure(error);
      setErrors(serverErrors(error, fields));
    } finally {
      inFlight.current = false;
      setSubmitting(false);
    }
  }

  function reset() {
    setErrors({});
    setSucceeded(false);
    setFailure(null);
  }

  return { onSubmit, errors, submitting, succeeded, failure, reset };
}
