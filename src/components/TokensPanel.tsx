import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { formatWhen, requestJson } from '../lib/client/api';
import { useZodForm } from '../lib/client/use-zod-form';
import type { ApiTokenSummary, CreatedApiToken, TokenTeam, Wire } from '../lib/contract';
import { createTokenSchema } from '../lib/validation/team';
import { FieldError, FormError, dangerButton, inputClass, labelClass, primaryButton, secondaryButton } from './form-parts';
import QueryRoot from './QueryRoot';

function NewSecret({ token, name, onDone }: { token: string; name: string; onDone: () => void }) {
  const [copied, setCopied] = useState<'yes' | 'failed' | null>(null);
  async function copy() {
    try {
      await navigator.clipboard.writeText(token);
      setCopied('yes');
    } catch {
      setCopied('failed');
    }
  }
  return (
    <section className="border-2 border-ochre bg-paper p-5 space-y-3" aria-label="New token secret" data-testid="new-token">
      <h3 className="font-semibold">Token “{name}” created</h3>
      <p className="text-sm border-l-4 border-ochre pl-3">
        Copy it now: this is the only time it is shown. Slipless keeps only a hash, so a lost token cannot be recovered, only
        revoked and replaced. Treat it like a password.
      </p>
      <div className="flex gap-2 items-stretch">
        <input
          readOnly
          value={token}
          aria-label="Token secret"
          data-testid="token-secret"
          className="w-full border-2 border-ink bg-paper-deep px-3 py-2 font-mono text-sm"
          onFocus={(event) => event.currentTarget.select()}
        />
        <button type="button" onClick={copy} className={secondaryButton}>
          {copied === 'yes' ? 'Copied' : 'Copy'}
        </button>
      </div>
      {copied === 'failed' && <p className="text-xs text-sienna">The browser refused to copy; select the text and copy it by hand.</p>}
      <p className="text-xs text-graphite">
        Use it as <code className="num">Authorization: Bearer slp_…</code> on the API.
      </p>
      <button type="button" onClick={onDone} className={primaryButton}>
        I have stored it
      </button>
    </section>
  );
}

function CreateTokenForm({ teams, onCreated }: { teams: TokenTeam[]; onCreated: (secret: { token: string; name: string }) => void }) {
  const queryClient = useQueryClient();
  const [teamId, setTeamId] = useState(teams[0]?.teamId ?? '');
  const allowed = teams.find((t) => t.teamId === teamId)?.tokenRoles ?? [];
  const create = useZodForm({
    schema: createTokenSchema,
    fields: ['name', 'teamId', 'role'],
    submit: async (input) => {
      const { token, summary } = await requestJson<Wire<CreatedApiToken>>('/api/tokens', { method: 'POST', body: input });
      onCreated({ token, name: summary.name });
      void queryClient.invalidateQueries({ queryKey: ['tokens'] });
    },
  });
  const { errors } = create;

  return (
    <form onSubmit={create.onSubmit} noValidate className="grid gap-4 md:grid-cols-[2fr_3fr_1fr_auto] items-start" aria-label="Create an API token">
      <label className={labelClass}>
        Name
        <input name="name" placeholder="CI log upload" className={inputClass} aria-invalid={!!errors.name} aria-describedby="token-name-error" />
        <FieldError id="token-name-error" message={errors.name} />
      </label>
      <label className={labelClass}>
        Team
        <select name="teamId" value={teamId} onChange={(e) => setTeamId(e.target.value)} className={inputClass} aria-invalid={!!errors.teamId}>
          {teams.map((team) => (
            <option key={team.teamId} value={team.teamId}>
              {team.name} ({team.role})
            </option>
          ))}
        </select>
        <FieldError id="token-team-error" message={errors.teamId} />
      </label>
      <label className={labelClass}>
        Role
        <select name="role" key={teamId} defaultValue="viewer" className={inputClass} aria-invalid={!!errors.role} aria-describedby="token-role-error">
          {allowed.map((role) => (
            <option key={role} value={role}>
              {role}
            </option>
          ))}
        </select>
        <FieldError id="token-role-error" message={errors.role} />
      </label>
      <div className="md:pt-6">
        <button disabled={create.submitting} className={primaryButton}>
          {create.submitting ? 'Creating…' : 'Create token'}
        </button>
      </div>
      <div className="md:col-span-4">
        <FormError message={errors.form} />
      </div>
    </form>
  );
}

function TokenList() {
  const queryClient = useQueryClient();
  const [confirming, setConfirming] = useState<string | null>(null);
  const tokens = useQuery({ queryKey: ['tokens'], queryFn: () => requestJson<{ tokens: Wire<ApiTokenSummary>[] }>('/api/tokens').then((r) => r.tokens) });
  const revoke = useMutation({
    mutationFn: (id: string) => requestJson<void>(`/api/tokens/${encodeURIComponent(id)}`, { method: 'DELETE' }),
    onSettled: () => {
      setConfirming(null);
      void queryClient.invalidateQueries({ queryKey: ['tokens'] });
    },
  });

  if (tokens.isPending) return <p className="text-sm text-graphite">Loading tokens…</p>;
  if (tokens.isError) return <FormError message={tokens.error.message} />;
  if (!tokens.data.length) return <p className="text-sm text-graphite">You have no API tokens yet.</p>;
  return (
    <div className="overflow-x-auto">
      {revoke.isError && <FormError message={revoke.error.message} />}
      <table className="w-full text-sm border-collapse" data-testid="token-list">
        <thead>
          <tr className="text-left border-b-2 border-ink">
            <th className="py-2 pr-4">Name</th>
            <th className="py-2 pr-4">Team</th>
            <th className="py-2 pr-4">Role</th>
            <th className="py-2 pr-4">Created</th>
            <th className="py-2 pr-4">Last used</th>
            <th className="py-2 pr-4">Status</th>
            <th className="py-2" />
          </tr>
        </thead>
        <tbody>
          {tokens.data.map((token) => (
            <tr key={token.id} className={'border-b border-rule ' + (token.revokedAt ? 'text-graphite' : '')} data-token-name={token.name}>
              <td className="py-2 pr-4 font-semibold">{token.name}</td>
              <td className="py-2 pr-4">{token.teamName}</td>
              <td className="py-2 pr-4 num text-xs uppercase">{token.role}</td>
              <td className="py-2 pr-4 num text-xs">{formatWhen(token.createdAt)}</td>
              <td className="py-2 pr-4 num text-xs">{formatWhen(token.lastUsedAt)}</td>
              <td className="py-2 pr-4 text-xs">
                {token.revokedAt ? <span className="text-sienna">revoked {formatWhen(token.revokedAt)}</span> : <span className="text-verdigris-deep">active</span>}
              </td>
              <td className="py-2 text-right whitespace-nowrap">
                {!token.revokedAt &&
                  (confirming === token.id ? (
                    <span className="inline-flex gap-2">
                      <button type="button" className={dangerButton} disabled={revoke.isPending} onClick={() => revoke.mutate(token.id)}>
                        Revoke now
                      </button>
                      <button type="button" className={secondaryButton} onClick={() => setConfirming(null)}>
                        Keep
                      </button>
                    </span>
                  ) : (
                    <button type="button" className={dangerButton} onClick={() => setConfirming(token.id)}>
                      Revoke
                    </button>
                  ))}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function Tokens({ teams }: { teams: TokenTeam[] }) {
  const [secret, setSecret] = useState<{ token: string; name: string } | null>(null);
  return (
    <div className="space-y-8">
      {secret ? <NewSecret {...secret} onDone={() => setSecret(null)} /> : <CreateTokenForm teams={teams} onCreated={setSecret} />}
      <TokenList />
    </div>
  );
}

export default function TokensPanel({ teams }: { teams: TokenTeam[] }) {
  return (
    <QueryRoot>
      <Tokens teams={teams} />
    </QueryRoot>
  );
}
