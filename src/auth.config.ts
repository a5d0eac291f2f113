import Credentials from '@auth/core/providers/credentials';
import { CredentialsSignin } from '@auth/core/errors';
import Nodemailer from '@auth/core/providers/nodemailer';
import { DrizzleAdapter } from '@auth/drizzle-adapter';
import type { Adapter } from '@auth/core/adapters';
import { AUTH_SECRET } from 'astro:env/server';
import { defineConfig } from 'auth-astro';
import { passwordSignInSchema } from './lib/validation/auth';
import { accounts, sessions, users, verificationTokens } from './db/schema';
import { storedAuthSecret } from './lib/server/bootstrap';
import { getDatabase } from './lib/server/database';
import { recordAudit } from './lib/server/audit';
import { endSession, getMemberships } from './lib/server/identity';
import { dummyPasswordHash, verifyPassword } from './lib/server/passwords';
import { allowSignInLink, finishSignIn, startSignIn } from './lib/server/rate-limit';
import { sendMail } from './lib/server/email';
import { findUserByEmail } from './lib/server/users';
import { CLIENT_ADDRESS_HEADER } from './consts';

declare module '@auth/core/types' {
  interface Session {
    /** When the session began (ms since the epoch); 0 for sessions begun before this was recorded. */
    signedInAt?: number;
    /** Random id of the session, recorded at sign-out so the cookie stops working (ended_sessions). */
    sessionId?: string;
  }
}

/** Sign-in link mails wait this long, past the answer to the request, so mailing an existing account does not slow that answer. */
const LINK_MAIL_DELAY_MS = 1_000;
const SESSION_MAX_AGE_S = 30 * 24 * 60 * 60;

class RateLimited extends CredentialsSignin {
  code = 'rate_limited';
}

/** The Drizzle adapter with every call sent through the database's write queue. */
async function queuedAdapter(): Promise<Adapter> {
  const database = await getDatabase();
  const base = DrizzleAdapter(database.db, {
    usersTable: users,
    accountsTable: accounts,
    sessionsTable: sessions,
    verificationTokensTable: verificationTokens,
  }) as Record<string, unknown>;
  return Object.fromEntries(
    Object.entries(base).map(([name, method]) => [
      name,
      typeof method === 'function' ? (...args: unknown[]) => database.write(() => method(...args)) : method,
    ]),
  ) as Adapter;
}

async function auditSignIn(userId: string | null, action: string, address: string, detail: Record<string, unknown>) {
  const database = await getDatabase();
  const teams = userId ? await getMemberships(database, userId) : [];
  const targets = teams.length ? teams.map((t) => t.teamId) : [null];
  await recordAudit(database, targets.map((teamId) => ({ teamId, actorId: userId, action, address, detail })));
}

export default defineConfig({
  // Without AUTH_SECRET, the one kept in the database (the start command warns where that is unsafe).
  secret: AUTH_SECRET || (await storedAuthSecret(await getDatabase())),
  trustHost: true,
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
  adapter: await queuedAdapter(),
  pages: { signIn: '/sign-in', verifyRequest: '/sign-in/check-email', error: '/sign-in' },
  providers: [
    Credentials({
      credentials: { email: { type: 'email' }, password: { type: 'password' } },
      async authorize(raw, request) {
        const parsed = passwordSignInSchema.safeParse(raw);
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        const address = request.headers.get(CLIENT_ADDRESS_HEADER) ?? 'unknown';
        const database = await getDatabase();
        const started = await startSignIn(database, { email, address });
        if (!started.ok) {
          await auditSignIn(null, 'auth.sign_in_blocked', address, { email });
          throw new RateLimited();
        }
        const user = await findUserByEmail(database, email);
        // One argon2 check on every path, so the answer's timing does not tell which addresses have accounts.
        const matches = await verifyPassword(user?.passwordHash ?? (await dummyPasswordHash()), password);
        const ok = !!user?.passwordHash && matches;
        await finishSignIn(database, started.attempt, ok);
        await auditSignIn(user?.id ?? null, ok ? 'auth.sign_in' : 'auth.sign_in_failed', address, { email, method: 'password' });
        return ok ? { id: user.id, email: user.email, name: user.name } : null;
      },
    }),
    Nodemailer({
      server: {},
      // Every request gets the same answer at the same pace: the limits and the account lookup
      // run for all, and the mail (only to existing accounts) starts once the answer is out.
      async sendVerificationRequest({ identifier, url, request }) {
        const database = await getDatabase();
        const address = request.headers.get(CLIENT_ADDRESS_HEADER) ?? 'unknown';
        const allowed = await allowSignInLink(database, { email: identifier, address });
        const known = await findUserByEmail(database, identifier);
        if (!allowed || !known) return;
        const mail = {
          to: identifier,
          subject: 'Your Slipless sign-in link',
          text: `Sign in to Slipless with this link (valid for 24 hours, usable once):\n\n${url}\n\nIf you did not ask for it, ignore this e-mail.`,
        };
        setTimeout(() => sendMail(mail).catch((error: Error) => console.error(`Sign-in link mail failed: ${error.message}`)), LINK_MAIL_DELAY_MS);
      },
    }),
  ],
  callbacks: {
    async signIn({ user, email }) {
      // A link request gets the same answer for every address (only existing accounts get mail);
      // following a link, or any other sign-in, needs an existing account.
      if (email?.verificationRequest) return true;
      const database = await getDatabase();
      const known = await findUserByEmail(database, user.email ?? '');
      return !!known;
    },
    jwt({ token, user }) {
      // The sign-in time lets a password change or reset end every session begun before it (users.sessionsValidFrom).
      // The session id, kept across refreshes, lets sign-out end this one session on the server.
      if (user?.id) {
        token.sub = user.id;
        token.signedInAt = Date.now();
        token.sid = crypto.randomUUID();
      }
      return token;
    },
    session({ session, token }) {
      return {
        expires: session.expires,
        user: { id: token.sub ?? '', email: session.user?.email ?? '', name: session.user?.name ?? null },
        signedInAt: typeof token.signedInAt === 'number' ? token.signedInAt : 0,
        sessionId: typeof token.sid === 'string' ? token.sid : undefined,
      } as typeof session;
    },
  },
  events: {
    async signIn({ user, account }) {
      if (account?.provider === 'nodemailer' && user.id) await auditSignIn(user.id, 'auth.sign_in', 'email-link', { method: 'email-link' });
    },
    async signOut(message) {
      const token = 'token' in message ? message.token : null;
      if (typeof token?.sid === 'string') {
        const expiresAt = new Date(typeof token.exp === 'number' ? token.exp * 1000 : Date.now() + SESSION_MAX_AGE_S * 1000);
        await endSession(await getDatabase(), { sessionId: token.sid, userId: token.sub ?? null, expiresAt });
      }
      if (token?.sub) await auditSignIn(token.sub, 'auth.sign_out', 'session', {});
    },
  },
});
