import { useState } from 'react';
import { requestJson, signInWithPassword } from '../lib/client/api';
import { useZodForm } from '../lib/client/use-zod-form';
import { newAccountSchema } from '../lib/validation/invitations';
import { z } from '../lib/validation/zod';
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

/** An existing account joins with nothing to fill in. */
const joinSchema = z.object({});

export default function AcceptInvitationForm({ token, email, teamName, hasAccount, signedInAs }: Props) {
  const [joined, setJoined] = useState(false);
  const accept = useZodForm({
    schema: hasAccount ? joinSchema : newAccountSchema,
    fields: ['name', 'password'],
    submit: async (account: { name?: string; password?: string }) => {
      await requestJson('/api/invitations/accept', { method: 'POST', body: { token, ...account } });
      if (account.password) {
        const { url, error } = await signInWithPassword(email, account.password, '/');
        window.location.href = error ? '/sign-in' : url;
      } else if (signedInAs === email) {
        window.location.href = '/';
      } else {
        setJoined(true);
      }
    },
  });
  const { errors } = accept;
  // After a successful accept the page is navigating away: the button stays disabled.
  const busy = accept.submitting || accept.succeeded;

  if (joined) {
    return (
      <p className="text-sm border-l-4 border-verdigris pl-3" role="status">
        You joined {teamName}. <a className="font-semibold underline" href="/sign-in">Sign in as {email}</a> to start.
      </p>
    );
  }

  return (
    <form onSubmit={accept.onSubmit} noValidate className="space-y-4" aria-label="Accept the invitation">
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
