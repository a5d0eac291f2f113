import { useState } from 'react';
import { requestJson } from '../lib/client/api';
import { useZodForm } from '../lib/client/use-zod-form';
import { deleteTeamBody, renameTeamBody } from '../lib/validation/teams';

interface TeamSettingsProps {
  teamId: string;
  name: string;
  slug: string;
}

/** Owner-only team settings: rename, and delete with the slug typed as confirmation. */
export default function TeamSettings({ teamId, name, slug }: TeamSettingsProps) {
  const [newName, setNewName] = useState(name);
  const [confirm, setConfirm] = useState('');
  const url = `/api/teams/${teamId}`;
  const rename = useZodForm({
    schema: renameTeamBody,
    fields: ['name'],
    read: () => ({ name: newName }),
    submit: async (input) => {
      await requestJson(url, { method: 'PATCH', body: input });
      window.location.reload();
    },
  });
  const remove = useZodForm({
    schema: deleteTeamBody,
    fields: [],
    read: () => ({ confirm }),
    submit: async (input) => {
      await requestJson(url, { method: 'DELETE', body: input });
      window.location.assign('/account');
    },
  });
  // Every refusal of a rename is about the name, so it shows under the field.
  const nameError = rename.errors.name ?? rename.errors.form;
  const removeError = remove.errors.form;
  const field = 'mt-1 w-full border-2 border-ink bg-paper px-3 py-2 text-sm focus:outline-none focus:border-verdigris';

  return (
    <section aria-label="Team settings" className="border-2 border-ink p-5 space-y-6">
      <h2 className="font-semibold">Team settings</h2>
      <form
        className="flex flex-wrap items-end gap-3"
        noValidate
        onSubmit={rename.onSubmit}
      >
        <label className="block flex-1 min-w-64 text-sm font-semibold">
          Team name
          <input className={field} value={newName} onChange={(e) => setNewName(e.target.value)} aria-invalid={!!nameError} />
          {nameError && <span role="alert" className="mt-1 block text-xs text-sienna">{nameError}</span>}
        </label>
        <button className="bg-ink text-paper px-4 py-2 text-sm font-semibold hover:bg-verdigris-deep" disabled={rename.submitting}>
          Rename
        </button>
      </form>
      <form
        className="border-t border-rule pt-4 space-y-2"
        noValidate
        onSubmit={remove.onSubmit}
      >
        <p className="text-sm text-graphite">
          Deleting the team removes its members' access, its sheets with every revision, its invitations and its API tokens. It cannot be undone.
        </p>
        <label className="block text-sm font-semibold">
          Type <span className="num">{slug}</span> to confirm
          <input className={field} value={confirm} onChange={(e) => setConfirm(e.target.value)} />
        </label>
        {removeError && <p role="alert" className="text-xs text-sienna">{removeError}</p>}
        <button className="border-2 border-sienna px-4 py-2 text-sm font-semibold text-sienna hover:bg-paper-deep" disabled={confirm !== slug || remove.submitting}>
          Delete this team
        </button>
      </form>
    </section>
  );
}
