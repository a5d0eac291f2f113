import { useState, type SubmitEvent } from 'react';
import { requestJson, fieldErrors, serverErrors } from '../lib/client/api';
import { signInWithPassword } from '../lib/client/sign-in';
import { newAccountSchema } from '../lib/validation/invitations';
import { FieldError, FormError, inputClass, labelClass, NewPasswordField, primaryButton } from './form-parts';

interface Props {
  token: string;
  email: string;
  teamName: string;
  /** True when the invited address already has an account: no name or password is asked. */
  hasAccount: boolean;
  /** The e-mail of whoever is signed in in this browser, if anyone. */
  signedInAs: string | null;
}

type Errors = Partial<Record<'name' | 'password' | 'form', string>>;

export default function AcceptInvitationForm({ token, email, teamName, hasAccount, signedInAs }: Props) {
  const [errors, setErrors] = useState<Errors>({});
  const [busy, setBusy] = useState(false);
  const [joined, setJoined] = useState(false);

  async function submit(event: SubmitEvent<HTMLFormElement>) {
    event.preventDefault();
    let account: { name: string; password: string } | undefined;
    if (!hasAccount) {
      const parsed = newAccountSchema.safeParse(Object.fromEntries(new FormData(event.currentTarget)));
      if (!parsed.success) {
        setErrors(fieldErrors(parsed.error.issues));
        return;
      }
      account = parsed.data;
    }
    setBusy(true);
    setErrors({});
    try {
      await requestJson('/api/invitations/accept', { method: 'POST', body: { token, ...account } });
    } catch (error) {
      setErrors(serverErrors(error, ['name', 'password']));
      setBusy(false);
      return;
    }
    if (account) {
      const { url, error } = await signInWithPassword(email, account.password, '/');
      window.location.href = error ? '/sign-in' : url;
    } else if (signedInAs === email) {
      window.location.href = '/';
    } else {
      setJoined(true);
      setBusy(false);
    }
  }

  if (joined) {
    return (
      <p className="text-sm border-l-4 border-verdigris pl-3" role="status">
        You joined {teamName}. <a className="font-semibold underline" href="/sign-in">Sign in as {email}</a> to start.
      </p>
    );
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-label="Accept the invitation">
      {hasAccount ? (
        <p className="text-sm text-graphite">
          {email} already has a Slipless account; accepting adds {teamName} to it.
          {signedInAs && signedInAs !== email && ` You are signed in as ${signedInAs}; sign in as ${email} afterwards to work in the team.`}
        </p>
      ) : (
        <>
          <p className="text-sm text-graphite">Create your account for {email}.</p>
          <label className={labelClass}>
            Your name
            <input name="name" autoComplete="name" className={inputClass} aria-invalid={!!errors.name} aria-describedby="name-error" />
            <FieldError id="name-error" message={errors.name} />
          </label>
          <NewPasswordField label="Password" name="password" error={errors.password} />
        </>
      )}
      <FormError message={errors.form} />
      <button disabled={busy} className={primaryButton + ' w-full'}>
        {busy ? 'Joining…' : hasAccount ? `Join ${teamName}` : 'Create account and join'}
      </button>
    </form>
  );
}
