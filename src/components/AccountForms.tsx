import { useMutation } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { fieldErrors, requestJson, serverErrors } from '../lib/client/api';
import { changePasswordSchema, type ChangePasswordInput } from '../lib/validation/account';
import { switchTeamSchema } from '../lib/validation/team';
import { FieldError, FormError, inputClass, labelClass, NewPasswordField, primaryButton } from './form-parts';
import QueryRoot from './QueryRoot';

interface TeamChoice {
  teamId: string;
  name: string;
  role: string;
}

function Switcher({ teams, currentTeamId }: { teams: TeamChoice[]; currentTeamId: string | null }) {
  const [errors, setErrors] = useState<Record<string, string>>({});
  const switchTeam = useMutation({
    mutationFn: (input: { teamId: string }) => requestJson('/api/me/team', { method: 'PUT', body: input }),
    onSuccess: () => window.location.reload(),
    onError: (error) => setErrors(serverErrors(error, ['teamId'])),
  });
  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const parsed = switchTeamSchema.safeParse(Object.fromEntries(new FormData(event.currentTarget)));
    if (!parsed.success) return setErrors(fieldErrors(parsed.error.issues));
    setErrors({});
    switchTeam.mutate(parsed.data);
  }
  return (
    <form onSubmit={submit} noValidate className="flex flex-wrap gap-3 items-start" aria-label="Switch team">
      <label className={labelClass + ' grow'}>
        Work in
        <select name="teamId" defaultValue={currentTeamId ?? undefined} className={inputClass} aria-invalid={!!errors.teamId} aria-describedby="switch-team-error">
          {teams.map((team) => (
            <option key={team.teamId} value={team.teamId}>
              {team.name} ({team.role})
            </option>
          ))}
        </select>
        <FieldError id="switch-team-error" message={errors.teamId ?? errors.form} />
      </label>
      <div className="pt-6">
        <button disabled={switchTeam.isPending} className={primaryButton}>
          {switchTeam.isPending ? 'Switching…' : 'Switch'}
        </button>
      </div>
    </form>
  );
}

function PasswordForm() {
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [done, setDone] = useState(false);
  const change = useMutation({
    mutationFn: (input: ChangePasswordInput) => requestJson('/api/account/password', { method: 'POST', body: input }),
    onError: (error) => setErrors(serverErrors(error, ['currentPassword', 'newPassword'])),
  });
  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = event.currentTarget;
    setDone(false);
    const parsed = changePasswordSchema.safeParse(Object.fromEntries(new FormData(form)));
    if (!parsed.success) return setErrors(fieldErrors(parsed.error.issues));
    setErrors({});
    change.mutate(parsed.data, {
      onSuccess: () => {
        form.reset();
        setDone(true);
      },
    });
  }
  return (
    <form onSubmit={submit} noValidate className="space-y-4 max-w-md" aria-label="Change password">
      <label className={labelClass}>
        Current password
        <input name="currentPassword" type="password" autoComplete="current-password" className={inputClass} aria-invalid={!!errors.currentPassword} aria-describedby="current-password-error" />
        <FieldError id="current-password-error" message={errors.currentPassword} />
      </label>
      <NewPasswordField label="New password" name="newPassword" error={errors.newPassword} />
      <FormError message={errors.form} />
      {done && (
        <p className="text-sm text-verdigris-deep" role="status">
          Password changed. Every session has been signed out, this one included:{' '}
          <a href="/sign-in" className="underline">
            sign in again
          </a>{' '}
          with the new password. API tokens keep working; revoke them on the tokens page if they may be exposed.
        </p>
      )}
      <button disabled={change.isPending} className={primaryButton}>
        {change.isPending ? 'Changing…' : 'Change password'}
      </button>
    </form>
  );
}

export function TeamSwitcher(props: { teams: TeamChoice[]; currentTeamId: string | null }) {
  return (
    <QueryRoot>
      <Switcher {...props} />
    </QueryRoot>
  );
}

export function PasswordChange() {
  return (
    <QueryRoot>
      <PasswordForm />
    </QueryRoot>
  );
}
