import { useState, type SubmitEvent } from 'react';
import { fieldErrors, requestJson, serverErrors } from '../lib/client/api';
import { signInWithPassword } from '../lib/client/sign-in';
import { passwordResetConfirmSchema } from '../lib/validation/password-reset';
import { FormError, NewPasswordField, primaryButton } from './form-parts';

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
      <NewPasswordField label="New password" name="password" error={errors.password} />
      <FormError message={errors.form} />
      <button disabled={busy} className={primaryButton + ' w-full'}>
        {busy ? 'Saving…' : 'Set the new password and sign in'}
      </button>
    </form>
  );
}
