import { useMutation } from '@tanstack/react-query';
import { useState } from 'react';
import QueryRoot from './QueryRoot';
import { renameTeamBody } from '../lib/validation/teams';

interface TeamSettingsProps {
  teamId: string;
  name: string;
  slug: string;
}

/** Sends JSON to the API and throws the API's message on failure. */
async function send(url: string, method: string, body: unknown): Promise<void> {
  const response = await fetch(url, { method, headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
  if (!response.ok) throw new Error((await response.json().catch(() => ({})))?.error?.message ?? `The server answered ${response.status}.`);
}

function Settings({ teamId, name, slug }: TeamSettingsProps) {
  const [newName, setNewName] = useState(name);
  const [confirm, setConfirm] = useState('');
  const [nameError, setNameError] = useState<string | null>(null);
  const rename = useMutation({
    mutationFn: (value: string) => send(`/api/teams/${teamId}`, 'PATCH', { name: value }),
    onSuccess: () => window.location.reload(),
    onError: (e: Error) => setNameError(e.message),
  });
  const remove = useMutation({
    mutationFn: () => send(`/api/teams/${teamId}`, 'DELETE', { confirm }),
    onSuccess: () => window.location.assign('/account'),
  });
  const field = 'mt-1 w-full border-2 border-ink bg-paper px-3 py-2 text-sm focus:outline-none focus:border-verdigris';

  return (
    <section aria-label="Team settings" className="border-2 border-ink p-5 space-y-6">
      <h2 className="font-semibold">Team settings</h2>
      <form
        className="flex flex-wrap items-end gap-3"
        noValidate
        onSubmit={(event) => {
          event.preventDefault();
          const parsed = renameTeamBody.safeParse({ name: newName });
          if (!parsed.success) return setNameError(parsed.error.issues[0].message);
          setNameError(null);
          rename.mutate(parsed.data.name);
        }}
      >
        <label className="block flex-1 min-w-64 text-sm font-semibold">
          Team name
          <input className={field} value={newName} onChange={(e) => setNewName(e.target.value)} aria-invalid={!!nameError} />
          {nameError && <span role="alert" className="mt-1 block text-xs text-sienna">{nameError}</span>}
        </label>
        <button className="bg-ink text-paper px-4 py-2 text-sm font-semibold hover:bg-verdigris-deep" disabled={rename.isPending}>
          Rename
        </button>
      </form>
      <form
        className="border-t border-rule pt-4 space-y-2"
        noValidate
        onSubmit={(event) => {
          event.preventDefault();
          remove.mutate();
        }}
      >
        <p className="text-sm text-graphite">
          Deleting the team removes its members' access, its sheets with every revision, its invitations and its API tokens. It cannot be undone.
        </p>
        <label className="block text-sm font-semibold">
          Type <span className="num">{slug}</span> to confirm
          <input className={field} value={confirm} onChange={(e) => setConfirm(e.target.value)} />
        </label>
        {remove.error && <p role="alert" className="text-xs text-sienna">{remove.error.message}</p>}
        <button className="border-2 border-sienna px-4 py-2 text-sm font-semibold text-sienna hover:bg-paper-deep" disabled={confirm !== slug || remove.isPending}>
          Delete this team
        </button>
      </form>
    </section>
  );
}

/** Owner-only team settings: rename, and delete with the slug typed as confirmation. */
export default function TeamSettings(props: TeamSettingsProps) {
  return (
    <QueryRoot>
      <Settings {...props} />
    </QueryRoot>
  );
}
