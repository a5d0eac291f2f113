import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { formatWhen, requestJson } from '../lib/client/api';
import { useZodForm } from '../lib/client/use-zod-form';
import type { Member, PendingInvitation, TeamApiToken, Wire } from '../lib/contract';
import { createInvitationSchema, ROLE_SUMMARIES } from '../lib/validation/invitations';
import { ROLES, type Role } from '../lib/roles';
import { FieldError, FormError, dangerButton, inputClass, labelClass, primaryButton, secondaryButton } from './form-parts';
import QueryRoot from './QueryRoot';

interface Props {
  teamId: string;
  currentUserId: string;
  isOwner: boolean;
}

const th = 'py-2 pr-4 text-left';
const td = 'py-2 pr-4 align-top';

function MemberActions({ teamId, member, isSelf }: { teamId: string; member: Wire<Member>; isSelf: boolean }) {
  const queryClient = useQueryClient();
  const [confirming, setConfirming] = useState(false);
  const url = `/api/teams/${encodeURIComponent(teamId)}/members/${encodeURIComponent(member.userId)}`;
  const refresh = () => queryClient.invalidateQueries({ queryKey: ['members', teamId] });
  const changeRole = useMutation({ mutationFn: (role: Role) => requestJson(url, { method: 'PATCH', body: { role } }), onSuccess: refresh });
  const remove = useMutation({ mutationFn: () => requestJson(url, { method: 'DELETE' }), onSuccess: refresh, onSettled: () => setConfirming(false) });
  const error = changeRole.error ?? remove.error;
  return (
    <>
      <td className={td}>
        <select
          aria-label={`Role of ${member.email}`}
          value={changeRole.isPending ? changeRole.variables : member.role}
          disabled={changeRole.isPending}
          onChange={(event) => {
            const role = event.target.value as Role;
            if (isSelf && member.role === 'owner' && role !== 'owner' && !window.confirm('Give up your owner rights in this team?')) return;
            changeRole.mutate(role);
          }}
          className="border-2 border-ink bg-paper px-2 py-1 font-mono text-xs uppercase"
        >
          {ROLES.map((role) => (
            <option key={role} value={role}>
              {role}
            </option>
          ))}
        </select>
        {error && (
          <span className="mt-1 block text-xs text-sienna max-w-xs" role="alert">
            {error.message}
          </span>
        )}
      </td>
      <td className="py-2 text-right whitespace-nowrap align-top">
        {confirming ? (
          <span className="inline-flex gap-2">
            <button type="button" className={dangerButton} disabled={remove.isPending} onClick={() => remove.mutate()}>
              {isSelf ? 'Leave now' : 'Remove now'}
            </button>
            <button type="button" className={secondaryButton} onClick={() => setConfirming(false)}>
              Keep
            </button>
          </span>
        ) : (
          <button type="button" className={dangerButton} onClick={() => setConfirming(true)}>
            {isSelf ? 'Leave' : 'Remove'}
          </button>
        )}
      </td>
    </>
  );
}

function MemberTable({ teamId, currentUserId, isOwner }: Props) {
  const members = useQuery({
    queryKey: ['members', teamId],
    queryFn: () => requestJson<{ members: Wire<Member>[] }>(`/api/teams/${encodeURIComponent(teamId)}/members`).then((r) => r.members),
  });
  if (members.isPending) return <p className="text-sm text-graphite">Loading members…</p>;
  if (members.isError) return <FormError message={members.error.message} />;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm border-collapse" data-testid="member-list">
        <thead>
          <tr className="border-b-2 border-ink">
            <th className={th}>Name</th>
            <th className={th}>E-mail</th>
            <th className={th}>Joined</th>
            <th className={th}>Role</th>
            {isOwner && <th className="py-2" />}
          </tr>
        </thead>
        <tbody>
          {members.data.map((member) => (
            <tr key={member.userId} className="border-b border-rule">
              <td className={td + ' font-semibold'}>
                {member.name ?? '—'}
                {member.userId === currentUserId && <span className="ml-2 text-xs font-normal text-graphite">(you)</span>}
              </td>
              <td className={td + ' num text-xs'}>{member.email}</td>
              <td className={td + ' num text-xs'}>{formatWhen(member.joinedAt)}</td>
              {isOwner ? (
                <MemberActions teamId={teamId} member={member} isSelf={member.userId === currentUserId} />
              ) : (
                <td className={td + ' num text-xs uppercase'}>{member.role}</td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function InviteForm({ teamId }: { teamId: string }) {
  const queryClient = useQueryClient();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const [role, setRole] = useState<Role>('viewer');
  const invite = useZodForm({
    schema: createInvitationSchema,
    fields: ['email', 'role'],
    submit: async (input, form) => {
      await requestJson(`/api/teams/${encodeURIComponent(teamId)}/invitations`, { method: 'POST', body: input });
      setSentTo(input.email);
      form.reset();
      setRole('viewer');
      void queryClient.invalidateQueries({ queryKey: ['invitations', teamId] });
    },
  });
  const { errors } = invite;

  return (
    <form onSubmit={invite.onSubmit} noValidate className="space-y-3" aria-label="Invite someone by e-mail">
      <div className="grid gap-4 md:grid-cols-[3fr_1fr_auto] items-start">
        <label className={labelClass}>
          E-mail
          <input name="email" type="email" placeholder="name@example.com" className={inputClass} aria-invalid={!!errors.email} aria-describedby="invite-email-error" />
          <FieldError id="invite-email-error" message={errors.email} />
        </label>
        <label className={labelClass}>
          Role
          <select name="role" value={role} onChange={(e) => setRole(e.target.value as Role)} className={inputClass} aria-invalid={!!errors.role}>
            {ROLES.map((choice) => (
              <option key={choice} value={choice}>
                {choice}
              </option>
            ))}
          </select>
          <FieldError id="invite-role-error" message={errors.role} />
        </label>
        <div className="md:pt-6">
          <button disabled={invite.submitting} className={primaryButton}>
            {invite.submitting ? 'Sending…' : 'Send invitation'}
          </button>
        </div>
      </div>
      <p className="text-xs text-graphite">
        A <span className="num uppercase">{role}</span> may: {ROLE_SUMMARIES[role]}.
      </p>
      <FormError message={errors.form} />
      {invite.succeeded && sentTo && (
        <p className="text-sm text-verdigris-deep" role="status">
          Invitation sent to {sentTo}.
        </p>
      )}
    </form>
  );
}

function PendingInvitations({ teamId }: { teamId: string }) {
  const queryClient = useQueryClient();
  const invitations = useQuery({
    queryKey: ['invitations', teamId],
    queryFn: () => requestJson<{ invitations: Wire<PendingInvitation>[] }>(`/api/teams/${encodeURIComponent(teamId)}/invitations`).then((r) => r.invitations),
  });
  const revoke = useMutation({
    mutationFn: (id: string) => requestJson(`/api/teams/${encodeURIComponent(teamId)}/invitations/${encodeURIComponent(id)}`, { method: 'DELETE' }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: ['invitations', teamId] }),
  });
  if (invitations.isPending) return <p className="text-sm text-graphite">Loading invitations…</p>;
  if (invitations.isError) return <FormError message={invitations.error.message} />;
  if (!invitations.data.length) return <p className="text-sm text-graphite">No invitations are waiting for an answer.</p>;
  return (
    <div className="overflow-x-auto">
      {revoke.isError && <FormError message={revoke.error.message} />}
      <table className="w-full text-sm border-collapse" data-testid="invitation-list">
        <thead>
          <tr className="border-b-2 border-ink">
            <th className={th}>E-mail</th>
            <th className={th}>Role</th>
            <th className={th}>Invited by</th>
            <th className={th}>Expires</th>
            <th className="py-2" />
          </tr>
        </thead>
        <tbody>
          {invitations.data.map((invitation) => (
            <tr key={invitation.id} className="border-b border-rule">
              <td className={td + ' num text-xs'}>{invitation.email}</td>
              <td className={td + ' num text-xs uppercase'}>{invitation.role}</td>
              <td className={td}>{invitation.invitedBy?.name ?? invitation.invitedBy?.email ?? '—'}</td>
              <td className={td + ' num text-xs'}>{formatWhen(invitation.expiresAt)}</td>
              <td className="py-2 text-right">
                <button type="button" className={dangerButton} disabled={revoke.isPending} onClick={() => revoke.mutate(invitation.id)}>
                  Withdraw
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function TeamTokens({ teamId }: { teamId: string }) {
  const queryClient = useQueryClient();
  const tokens = useQuery({
    queryKey: ['team-tokens', teamId],
    queryFn: () => requestJson<{ tokens: Wire<TeamApiToken>[] }>(`/api/teams/${encodeURIComponent(teamId)}/tokens`).then((r) => r.tokens),
  });
  const revoke = useMutation({
    mutationFn: (id: string) => requestJson(`/api/tokens/${encodeURIComponent(id)}`, { method: 'DELETE' }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: ['team-tokens', teamId] }),
  });
  if (tokens.isPending) return <p className="text-sm text-graphite">Loading tokens…</p>;
  if (tokens.isError) return <FormError message={tokens.error.message} />;
  const active = tokens.data.filter((t) => !t.revokedAt);
  if (!active.length) return <p className="text-sm text-graphite">No active API tokens can reach this team.</p>;
  return (
    <div className="overflow-x-auto">
      {revoke.isError && <FormError message={revoke.error.message} />}
      <table className="w-full text-sm border-collapse" data-testid="team-token-list">
        <thead>
          <tr className="border-b-2 border-ink">
            <th className={th}>Token</th>
            <th className={th}>Holder</th>
            <th className={th}>Role</th>
            <th className={th}>Last used</th>
            <th className="py-2" />
          </tr>
        </thead>
        <tbody>
          {active.map((token) => (
            <tr key={token.id} className="border-b border-rule">
              <td className={td + ' font-semibold'}>{token.name}</td>
              <td className={td}>
                {token.holderName ?? '—'}
                <span className="block text-xs text-graphite num">{token.holderEmail}</span>
              </td>
              <td className={td + ' num text-xs uppercase'}>{token.role}</td>
              <td className={td + ' num text-xs'}>{formatWhen(token.lastUsedAt)}</td>
              <td className="py-2 text-right">
                <button type="button" className={dangerButton} disabled={revoke.isPending} onClick={() => revoke.mutate(token.id)}>
                  Revoke
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function Members(props: Props) {
  return (
    <div className="space-y-10">
      <section aria-labelledby="members-heading" className="space-y-3">
        <h2 id="members-heading" className="text-lg font-semibold">
          Members
        </h2>
        {props.isOwner && (
          <p className="text-sm text-graphite">
            Changing a role takes effect on the member's next request; their API tokens above the new role stop working.
          </p>
        )}
        <MemberTable {...props} />
      </section>
      {props.isOwner && (
        <>
          <section aria-labelledby="invite-heading" className="space-y-3 border-t border-rule pt-6">
            <h2 id="invite-heading" className="text-lg font-semibold">
              Invite someone
            </h2>
            <InviteForm teamId={props.teamId} />
          </section>
          <section aria-labelledby="pending-heading" className="space-y-3 border-t border-rule pt-6">
            <h2 id="pending-heading" className="text-lg font-semibold">
              Pending invitations
            </h2>
            <PendingInvitations teamId={props.teamId} />
          </section>
          <section aria-labelledby="team-tokens-heading" className="space-y-3 border-t border-rule pt-6">
            <h2 id="team-tokens-heading" className="text-lg font-semibold">
              API tokens in this team
            </h2>
            <p className="text-sm text-graphite">Every member's active tokens for this team; revoking one stops it at once.</p>
            <TeamTokens teamId={props.teamId} />
          </section>
        </>
      )}
    </div>
  );
}

export default function MembersPanel(props: Props) {
  return (
    <QueryRoot>
      <Members {...props} />
    </QueryRoot>
  );
}
