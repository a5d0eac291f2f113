import { requestJson, signInWithPassword } from '../lib/client/api';
import { useZodForm } from '../lib/client/use-zod-form';
import { passwordResetConfirmSchema } from '../lib/validation/password-reset';
import { FormError, NewPasswordField, primaryButton } from './form-parts';

export default function PasswordResetForm({ token, email }: { token: string; email: string }) {
  const reset = useZodForm({
    schema: passwordResetConfirmSchema,
    fields: ['password'],
    read: (form) => ({ token, password: new FormData(form).get('password') ?? '' }),
    submit: async (input) => {
      await requestJson('/api/account/password-reset/confirm', { method: 'POST', body: input });
      const { url, error } = await signInWithPassword(email, input.password, '/');
      window.location.href = error ? '/sign-in' : url;
    },
  });
  // After a successful reset the page is navigating away: the button stays disabled.
  const busy = reset.submitting || reset.succeeded;

  return (
    <form onSubmit={reset.onSubmit} noValidate className="space-y-4" aria-label="Choose a new password">
      <input type="email" name="email" value={email} autoComplete="username" readOnly hidden />
      <NewPasswordField label="New password" name="password" error={reset.errors.password} />
      <FormError message={reset.errors.form} />
      <button disabled={busy} className={primaryButton + ' w-full'}>
        {busy ? 'Saving…' : 'Set the new password and sign in'}
      </button>
    </form>
  );
}
