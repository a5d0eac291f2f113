import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { count } from 'drizzle-orm';
import type { Database } from '../../db';
import { auditEvents, memberships, sheetRevisions, sheets, teams, users } from '../../db/schema';
import { DEMO_PASSWORD, DEMO_SHEETS_FOLDER, DEMO_TEAM, DEMO_USERS } from './demo';
import { hashPassword } from './passwords';
import { validateDocument } from './sheets';

export interface SeedOutcome {
  seeded: boolean;
  users: number;
  sheets: number;
}

interface DemoSheetFile {
  title?: string;
  tags?: string[];
}

/** Reads the example sheet documents that ship with the product, sorted by file name. */
function readDemoSheets(folder: string): { file: string; document: DemoSheetFile }[] {
  const dir = resolve(folder);
  if (!existsSync(dir)) return [];
  return readdirSync(dir)
    .filter((file) => file.endsWith('.json'))
    .sort()
    .map((file) => ({ file, document: JSON.parse(readFileSync(join(dir, file), 'utf8')) as DemoSheetFile }));
}

/** Seeds the invented demo team, its users in every role and its sheets, only into an empty database. */
export async function seedDemoData(database: Database, sheetsFolder = DEMO_SHEETS_FOLDER): Promise<SeedOutcome> {
  const [{ n: existingUsers }] = await database.db.select({ n: count() }).from(users);
  const [{ n: existingTeams }] = await database.db.select({ n: count() }).from(teams);
  if (existingUsers > 0 || existingTeams > 0) return { seeded: false, users: 0, sheets: 0 };

  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const demoSheets = readDemoSheets(sheetsFolder);
  await database.transaction(async (tx) => {
    const [team] = await tx.insert(teams).values(DEMO_TEAM).returning();
    const created = await tx
      .insert(users)
      .values(DEMO_USERS.map((u) => ({ name: u.name, email: u.email, passwordHash, emailVerified: new Date() })))
      .returning();
    await tx.insert(memberships).values(
      created.map((user, i) => ({ teamId: team.id, userId: user.id, role: DEMO_USERS[i].role })),
    );
    const author = created[DEMO_USERS.findIndex((u) => u.role === 'editor')];
    for (const { file, document } of demoSheets) {
      const checked = validateDocument(document);
      if (!checked.ok) throw new Error(`Demo sheet ${file} is invalid: ${checked.issues[0].path}: ${checked.issues[0].message}`);
      const [sheet] = await tx
        .insert(sheets)
        .values({
          teamId: team.id,
          title: document.title ?? file.replace(/\.json$/, ''),
          tags: document.tags ?? [],
          latestRevision: 1,
          createdBy: author.id,
        })
        .returning();
      await tx.insert(sheetRevisions).values({
        sheetId: sheet.id,
        number: 1,
        inputs: document,
        summary: checked.summary,
        message: 'Demo sheet',
        authorId: author.id,
      });
    }
    await tx.insert(auditEvents).values({ teamId: team.id, action: 'demo.seed', detail: { sheets: demoSheets.length } });
  });
  return { seeded: true, users: DEMO_USERS.length, sheets: demoSheets.length };
}
