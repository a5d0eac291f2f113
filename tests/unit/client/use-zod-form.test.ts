import { describe, expect, it, vi } from 'vitest';
import { ApiError, UNREACHABLE } from '../../../src/lib/client/api';
import { runZodForm } from '../../../src/lib/client/use-zod-form';
import { createInvitationSchema } from '../../../src/lib/validation/invitations';

const form = {} as HTMLFormElement;

/** The options of the invitation form with a given input and sender. */
function invitation(input: unknown, submit: (value: { email: string; role: string }) => Promise<Record<string, string> | void>) {
  return { schema: createInvitationSchema, fields: ['email', 'role'], read: () => input, submit };
}

describe('the form helper', () => {
  it('shows the schema messages by field and sends nothing when the input is invalid', async () => {
    const submit = vi.fn(async () => {});
    const sending = vi.fn();
    const outcome = await runZodForm(invitation({ email: 'not an address', role: 'boss' }, submit), form, sending);
    expect(outcome.succeeded).toBe(false);
    expect(outcome.errors.email).toBe('Enter an e-mail address like name@example.com.');
    expect(outcome.errors.role).toBe('Choose one of: owner, editor, reviewer, viewer.');
    expect(submit).not.toHaveBeenCalled();
    expect(sending).not.toHaveBeenCalled();
  });

  it('sends the parsed input (normalised by the schema) and succeeds', async () => {
    const submit = vi.fn(async () => {});
    const sending = vi.fn();
    const outcome = await runZodForm(invitation({ email: '  Ada@Example.com ', role: 'viewer' }, submit), form, sending);
    expect(submit).toHaveBeenCalledWith({ email: 'ada@example.com', role: 'viewer' }, form);
    expect(sending).toHaveBeenCalledOnce();
    expect(outcome).toEqual({ errors: {}, succeeded: true, failure: null });
  });

  it('puts a server error on the field its path names, and keeps the error', async () => {
    const refusal = new ApiError(409, { message: 'ada@example.com is already a member.', path: 'email' });
    const outcome = await runZodForm(invitation({ email: 'ada@example.com', role: 'viewer' }, () => Promise.reject(refusal)), form);
    expect(outcome).toEqual({ errors: { email: 'ada@example.com is already a member.' }, succeeded: false, failure: refusal });
  });

  it('puts a server error about another field, or none, on the whole form', async () => {
    const refusal = new ApiError(403, { message: 'Only owners invite.' });
    expect((await runZodForm(invitation({ email: 'ada@example.com', role: 'viewer' }, () => Promise.reject(refusal)), form)).errors).toEqual({ form: 'Only owners invite.' });
    const offline = await runZodForm(invitation({ email: 'ada@example.com', role: 'viewer' }, () => Promise.reject(new TypeError('Failed to fetch'))), form);
    expect(offline.errors).toEqual({ form: UNREACHABLE });
  });

  it('shows the messages a sender resolves to when it was refused without throwing', async () => {
    const outcome = await runZodForm(invitation({ email: 'ada@example.com', role: 'viewer' }, async () => ({ form: 'Too many attempts.' })), form);
    expect(outcome).toEqual({ errors: { form: 'Too many attempts.' }, succeeded: false, failure: null });
  });
});
