import { useState, type SubmitEvent } from 'react';
import { fieldErrors, requestJson, serverErrors } from '../lib/client/api';
import { PASSWORD_RESET_ANSWER, passwordResetRequestSchema } from '../lib/validation/password-reset';
import { FieldError, FormError, inputClass, labelClass, primaryButton } from './form-parts';

type Errors = Partial<Record<'email' | 'form', string>>;

export default function PasswordResetRequestForm() {
  const [errors, setErrors] = useState<Errors>({});
  const [busy, setBusy] = useState(false);
  const [sent, setSent] = useState(false);

  async function submit(event: SubmitEvent<HTMLFormElement>) {
    event.preventDefault();
    const parsed = passwordResetRequestSchema.safeParse(Object.fromEntries(new FormData(event.currentTarget)));
    if (!parsed.success) {
      setErrors(fieldErrors(parsed.error.issues));
      return;
    }
    setBusy(true);
    setErrors({});
    try {
      await requestJson('/api/account/password-reset', { method: 'POST', body: parsed.data });
      setSent(true);
    } catch (error) {
      setErrors(serverErrors(error, ['email']));
    } finally {
      setBusy(false);
    }
  }

  if (sent) {
    return (
      <div className="space-y-4">
        <p className="text-sm border-l-4 border-verdigris pl-3" role="status">
          {PASSWORD_RESET_ANSWER}
        </p>
        <p className="text-sm">
          <a className="underline hover:text-verdigris-deep" href="/sign-in">Back to sign-in</a>
        </p>
      </div>
    );
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-label="Ask for a password reset link">
      <label className={labelClass}>
        E-mail
        <input name="email" type="email" autoComplete="username" className={inputClass} aria-invalid={!!errors.email} aria-describedby="email-error" />
        <FieldError id="email-error" message={errors.email} />
      </label>
      <FormError message={errors.form} />
      <button disabled={busy} className={primaryButton + ' w-full'}>
        {busy ? 'Sending…' : 'Send me a reset link'}
      </button>
    </form>
  );
}
