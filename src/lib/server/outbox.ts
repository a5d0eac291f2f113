import { desc, eq, inArray, or } from 'drizzle-orm';
import type { Database } from '../../db';
import { invitations, mailOutbox, memberships, users, type OutboxMail } from '../../db/schema';

/**
 * Mail caught by the local fake SMTP server for the people of one team (its members and everyone
 * it invited), newest first. Scoped to the team so an owner never reads another team's mail.
 */
export async function listOutboxMail(database: Database, teamId: string, limit = 100): Promise<OutboxMail[]> {
  const memberEmails = database.db
    .select({ email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.teamId, teamId));
  const invitedEmails = database.db.select({ email: invitations.email }).from(invitations).where(eq(invitations.teamId, teamId));
  return database.db
    .select()
    .from(mailOutbox)
    .where(or(inArray(mailOutbox.to, memberEmails), inArray(mailOutbox.to, invitedEmails)))
    .orderBy(desc(mailOutbox.createdAt), desc(mailOutbox.id))
    .limit(limit);
}

/** Splits mail text into plain runs and http(s) links, so a page can show the links as anchors without rendering HTML. */
export function splitLinks(text: string): { text: string; href?: string }[] {
  const parts: { text: string; href?: string }[] = [];
  let last = 0;
  for (const match of text.matchAll(/https?:\/\/[^\s<>"')]+/g)) {
    if (match.index > last) parts.push({ text: text.slice(last, match.index) });
    parts.push({ text: match[0], href: match[0] });
    last = match.index + match[0].length;
  }
  if (last < text.length) parts.push({ text: text.slice(last) });
  return parts;
}
