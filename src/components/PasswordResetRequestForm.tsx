import { requestJson } from '../lib/client/api';
import { useZodForm } from '../lib/client/use-zod-form';
import { PASSWORD_RESET_ANSWER, passwordResetRequestSchema } from '../lib/validation/password-reset';
import { FieldError, FormError, inputClass, labelClass, primaryButton } from './form-parts';

export default function PasswordResetRequestForm() {
  const request = useZodForm({
    schema: passwordResetRequestSchema,
    fields: ['email'],
    submit: async (input) => {
      await requestJson('/api/account/password-reset', { method: 'POST', body: input });
    },
  });
  const { errors } = request;
  const busy = request.submitting;

  if (request.succeeded) {
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
    <form onSubmit={request.onSubmit} noValidate className="space-y-4" aria-label="Ask for a password reset link">
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
