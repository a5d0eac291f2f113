import { useState, type SubmitEvent } from 'react';
import { postAuthForm } from '../lib/client/api';
import { useZodForm } from '../lib/client/use-zod-form';
import { emailLinkSchema, passwordSignInSchema } from '../lib/validation/auth';

const ERROR_TEXT: Record<string, string> = {
  CredentialsSignin: 'That e-mail and password do not match an account.',
  rate_limited: 'Too many attempts. Wait a few minutes, then try again.',
  AccessDenied: 'That sign-in link cannot sign you in. Ask your team owner for an invitation.',
  Verification: 'That sign-in link has expired or was already used. Ask for a new one.',
};

export default function SignInForm({ callbackUrl, initialError }: { callbackUrl: string; initialError?: string }) {
  const [initialMessage, setInitialMessage] = useState(initialError ? (ERROR_TEXT[initialError] ?? 'Sign-in failed.') : undefined);
  const password = useZodForm({
    schema: passwordSignInSchema,
    fields: ['email', 'password'],
    submit: async (input) => {
      const { url, error } = await postAuthForm('/api/auth/callback/credentials', input, callbackUrl);
      if (error) return { form: ERROR_TEXT[error] ?? 'Sign-in failed.' };
      window.location.href = url;
    },
  });
  const link = useZodForm({
    schema: emailLinkSchema,
    fields: ['email'],
    submit: async (input) => {
      const { error } = await postAuthForm('/api/auth/signin/nodemailer', input, callbackUrl);
      if (error) return { form: ERROR_TEXT[error] ?? 'Could not send the link.' };
    },
  });
  const errors = password.errors;
  const busy = password.submitting || link.submitting;
  const formError = errors.form ?? initialMessage;
  // The error the page opened with (from a failed link or callback) gives way to the next attempt's.
  const clearingInitial = (submit: (event: SubmitEvent<HTMLFormElement>) => Promise<void>) => (event: SubmitEvent<HTMLFormElement>) => {
    setInitialMessage(undefined);
    return submit(event);
  };

  const field = 'mt-1 w-full border-2 border-ink bg-paper px-3 py-2 font-mono text-sm focus:outline-none focus:border-verdigris';
  return (
    <div className="space-y-8">
      <form onSubmit={clearingInitial(password.onSubmit)} noValidate className="space-y-4" aria-label="Sign in with password">
        <label className="block text-sm font-semibold">
          E-mail
          <input name="email" type="email" autoComplete="username" className={field} aria-invalid={!!errors.email} />
          {errors.email && <span className="mt-1 block text-xs text-sienna" role="alert">{errors.email}</span>}
        </label>
        <label className="block text-sm font-semibold">
          Password
          <input name="password" type="password" autoComplete="current-password" className={field} aria-invalid={!!errors.password} />
          {errors.password && <span className="mt-1 block text-xs text-sienna" role="alert">{errors.password}</span>}
        </label>
        <a href="/reset-password" className="block text-right text-xs text-graphite underline decoration-rule hover:text-verdigris-deep">
          Forgot your password?
        </a>
        {formError && <p className="text-sm text-sienna border-l-4 border-sienna pl-3" role="alert">{formError}</p>}
        <button disabled={busy} className="w-full bg-ink text-paper py-2 font-semibold hover:bg-verdigris-deep disabled:opacity-60">
          {busy ? 'Signing in…' : 'Sign in'}
        </button>
      </form>
      <form onSubmit={clearingInitial(link.onSubmit)} noValidate className="border-t border-rule pt-6 space-y-3" aria-label="Sign in with an e-mail link">
        <p className="text-sm text-graphite">Or get a one-time sign-in link by e-mail:</p>
        <div className="flex gap-2">
          <input name="email" type="email" placeholder="name@example.com" className={field + ' mt-0'} aria-label="E-mail for sign-in link" aria-invalid={!!link.errors.email} />
          <button disabled={busy} className="shrink-0 border-2 border-ink px-3 text-sm font-semibold hover:bg-paper-deep">Send link</button>
        </div>
        {(link.errors.email ?? link.errors.form) && <p className="text-xs text-sienna" role="alert">{link.errors.email ?? link.errors.form}</p>}
        {link.succeeded && <p className="text-sm text-verdigris-deep" role="status">If an account uses that address, a sign-in link is on its way: it works once, for 24 hours.</p>}
      </form>
    </div>
  );
}
