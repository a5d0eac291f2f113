import { useState, type SubmitEvent } from 'react';
import { fieldErrors, requestJson, serverErrors } from '../lib/client/api';
import { signInWithPassword } from '../lib/client/sign-in';
import { passwordResetConfirmSchema } from '../lib/validation/password-reset';
import { FieldError, FormError, inputClass, labelClass, primaryButton } from './form-parts';

type Errors = Partial<Record<'password' | 'form', string>>;

export default function PasswordResetForm({ token, email }: { token: string; email: string }) {
  const [errors, setErrors] = useState<Errors>({});
  const [busy, setBusy] = useState(false);

  async function submit(event: SubmitEvent<HTMLFormElement>) {
    event.preventDefault();
    const parsed = passwordResetConfirmSchema.safeParse({ token, password: new FormData(event.currentTarget).get('password') ?? '' });
    if (!parsed.success) {
      setErrors(fieldErrors(parsed.error.issues));
      return;
    }
    setBusy(true);
    setErrors({});
    try {
      await requestJson('/api/account/password-reset/confirm', { method: 'POST', body: parsed.data });
    } catch (error) {
      setErrors(serverErrors(error, ['password']));
      setBusy(false);
      return;
    }
    const { url, error } = await signInWithPassword(email, parsed.data.password, '/');
    window.location.href = error ? '/sign-in' : url;
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-label="Choose a new password">
      <input type="email" name="email" value={email} autoComplete="username" readOnly hidden />
      <label className={labelClass}>
        New password
        <input
          name="password"
          type="password"
          autoComplete="new-password"
          className={inputClass}
          aria-invalid={!!errors.password}
          aria-describedby="password-hint password-error"
        />
        <span id="password-hint" className="mt-1 block text-xs font-normal text-graphite">
          At least 10 characters; a few unrelated words make a strong one.
        </span>
        <FieldError id="password-error" message={errors.password} />
      </label>
      <FormError message={errors.form} />
      <button disabled={busy} className={primaryButton + ' w-full'}>
        {busy ? 'Saving…' : 'Set the new password and sign in'}
      </button>
    </form>
  );
}
