import { useState, type FormEvent } from 'react';
import { emailLinkSchema, passwordSignInSchema } from '../lib/validation/auth';

type FieldErrors = Partial<Record<'email' | 'password' | 'form', string>>;

const ERROR_TEXT: Record<string, string> = {
  CredentialsSignin: 'That e-mail and password do not match an account.',
  rate_limited: 'Too many attempts. Wait a few minutes, then try again.',
  AccessDenied: 'That sign-in link cannot sign you in. Ask your team owner for an invitation.',
  Verification: 'That sign-in link has expired or was already used. Ask for a new one.',
};

/** Posts a form to an Auth.js endpoint with its CSRF token; returns the error code, if any. */
async function postToAuth(path: string, fields: Record<string, string>, callbackUrl: string): Promise<{ url: string; error: string | null }> {
  const { csrfToken } = await (await fetch('/api/auth/csrf')).json();
  const response = await fetch(path, {
    method: 'POST',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded', 'X-Auth-Return-Redirect': '1' },
    body: new URLSearchParams({ ...fields, csrfToken, callbackUrl }),
  });
  const { url } = (await response.json()) as { url: string };
  const params = new URL(url, window.location.origin).searchParams;
  return { url, error: params.get('code') && params.get('code') !== 'credentials' ? params.get('code') : params.get('error') };
}

export default function SignInForm({ callbackUrl, initialError }: { callbackUrl: string; initialError?: string }) {
  const [errors, setErrors] = useState<FieldErrors>(initialError ? { form: ERROR_TEXT[initialError] ?? 'Sign-in failed.' } : {});
  const [busy, setBusy] = useState(false);
  const [linkSent, setLinkSent] = useState(false);

  async function submitPassword(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const data = Object.fromEntries(new FormData(event.currentTarget)) as Record<string, string>;
    const parsed = passwordSignInSchema.safeParse(data);
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setBusy(true);
    setErrors({});
    const { url, error } = await postToAuth('/api/auth/callback/credentials', parsed.data, callbackUrl);
    setBusy(false);
    if (error) setErrors({ form: ERROR_TEXT[error] ?? 'Sign-in failed.' });
    else window.location.href = url;
  }

  async function submitLink(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const parsed = emailLinkSchema.safeParse(Object.fromEntries(new FormData(event.currentTarget)));
    if (!parsed.success) {
      setErrors({ email: parsed.error.issues[0].message });
      return;
    }
    setBusy(true);
    const { error } = await postToAuth('/api/auth/signin/nodemailer', parsed.data, callbackUrl);
    setBusy(false);
    if (error) setErrors({ form: ERROR_TEXT[error] ?? 'Could not send the link.' });
    else setLinkSent(true);
  }

  const field = 'mt-1 w-full border-2 border-ink bg-paper px-3 py-2 font-mono text-sm focus:outline-none focus:border-verdigris';
  return (
    <div className="space-y-8">
      <form onSubmit={submitPassword} noValidate className="space-y-4" aria-label="Sign in with password">
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
        {errors.form && <p className="text-sm text-sienna border-l-4 border-sienna pl-3" role="alert">{errors.form}</p>}
        <button disabled={busy} className="w-full bg-ink text-paper py-2 font-semibold hover:bg-verdigris-deep disabled:opacity-60">
          {busy ? 'Signing in…' : 'Sign in'}
        </button>
      </form>
      <form onSubmit={submitLink} noValidate className="border-t border-rule pt-6 space-y-3" aria-label="Sign in with an e-mail link">
        <p className="text-sm text-graphite">Or get a one-time sign-in link by e-mail:</p>
        <div className="flex gap-2">
          <input name="email" type="email" placeholder="name@example.com" className={field + ' mt-0'} aria-label="E-mail for sign-in link" />
          <button disabled={busy} className="shrink-0 border-2 border-ink px-3 text-sm font-semibold hover:bg-paper-deep">Send link</button>
        </div>
        {linkSent && <p className="text-sm text-verdigris-deep" role="status">If an account uses that address, a sign-in link is on its way: it works once, for 24 hours.</p>}
      </form>
    </div>
  );
}
