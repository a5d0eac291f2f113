import { requestJson } from '../lib/client/api';
import { useZodForm } from '../lib/client/use-zod-form';
import { changePasswordSchema } from '../lib/validation/account';
import { switchTeamSchema } from '../lib/validation/team';
import { FieldError, FormError, inputClass, labelClass, NewPasswordField, primaryButton } from './form-parts';

interface TeamChoice {
  teamId: string;
  name: string;
  role: string;
}

/** Chooses the team the signed-in user works in. */
export function TeamSwitcher({ teams, currentTeamId }: { teams: TeamChoice[]; currentTeamId: string | null }) {
  const switchTeam = useZodForm({
    schema: switchTeamSchema,
    fields: ['teamId'],
    submit: async (input) => {
      await requestJson('/api/me/team', { method: 'PUT', body: input });
      window.location.reload();
    },
  });
  const { errors } = switchTeam;
  return (
    <form onSubmit={switchTeam.onSubmit} noValidate className="flex flex-wrap gap-3 items-start" aria-label="Switch team">
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
        <button disabled={switchTeam.submitting} className={primaryButton}>
          {switchTeam.submitting ? 'Switching…' : 'Switch'}
        </button>
      </div>
    </form>
  );
}

/** Changes the signed-in user's password (which signs out every session). */
export function PasswordChange() {
  const change = useZodForm({
    schema: changePasswordSchema,
    fields: ['currentPassword', 'newPassword'],
    submit: async (input, form) => {
      await requestJson('/api/account/password', { method: 'POST', body: input });
      form.reset();
    },
  });
  const { errors } = change;
  return (
    <form onSubmit={change.onSubmit} noValidate className="space-y-4 max-w-md" aria-label="Change password">
      <label className={labelClass}>
        Current password
        <input name="currentPassword" type="password" autoComplete="current-password" className={inputClass} aria-invalid={!!errors.currentPassword} aria-describedby="current-password-error" />
        <FieldError id="current-password-error" message={errors.currentPassword} />
      </label>
      <NewPasswordField label="New password" name="newPassword" error={errors.newPassword} />
      <FormError message={errors.form} />
      {change.succeeded && (
        <p className="text-sm text-verdigris-deep" role="status">
          Password changed. Every session has been signed out, this one included:{' '}
          <a href="/sign-in" className="underline">
            sign in again
          </a>{' '}
          with the new password. API tokens keep working; revoke them on the tokens page if they may be exposed.
        </p>
      )}
      <button disabled={change.submitting} className={primaryButton}>
        {change.submitting ? 'Changing…' : 'Change password'}
      </button>
    </form>
  );
}
