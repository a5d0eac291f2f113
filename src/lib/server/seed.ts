import { createHash, randomUUID } from 'node:crypto';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { Readable } from 'node:stream';
import { gzipSync } from 'node:zlib';
import type { Database } from '../../db';
import { and, count, eq } from 'drizzle-orm';
import { auditEvents, comments, memberships, reviews, sheetRevisions, sheets, teams, uploads } from '../../db/schema';
import { DEMO_LOGS, DEMO_PASSWORD, DEMO_SHEETS_FOLDER, DEMO_TEAM, DEMO_USERS, demoLogText } from './demo';
import type { LogStorage } from './log-storage-backends';
import { hashPassword } from './passwords';
import { checkDocument } from './sheets';
import { countUsers, createUsers } from './users';

export interface SeedOutcome {
  seeded: boolean;
  users: number;
  sheets: number;
  logs: number;
}

interface DemoSheetFile {
  title?: string;
  tags?: string[];
}

/** A revision made from a document by setting fields (JSON pointers) to new values. */
interface DemoEdit {
  message: string;
  set?: Record<string, unknown>;
}

/**
 * Earlier revisions of shipped sheets, oldest first, each the shipped file with the fields set;
 * `latest` is the message of the shipped file itself, the newest revision.
 */
const DEMO_HISTORY: Record<string, { earlier: DemoEdit[]; latest: string }> = {
  'line4-peg-tilt.json': {
    earlier: [
      {
        message: 'First check: tilt about y, across the grip line',
        set: {
          '/object/twist/angular': [0, '0.35 rad/s', 0],
          '/motion/target/orientation/axis': [0, 1, 0],
          '/hand/fingers/0/joints/0/rateLimit': '2 rad/s',
          '/hand/fingers/1/joints/0/rateLimit': '2 rad/s',
        },
      },
      {
        message: 'Tilt about the grip line (x) as the press needs it',
        set: { '/hand/fingers/0/joints/0/rateLimit': '2 rad/s', '/hand/fingers/1/joints/0/rateLimit': '2 rad/s' },
      },
    ],
    latest: 'Base joints rated 2.5 rad/s after the motor change',
  },
  'line4-capsule-pin-flip.json': {
    earlier: [
      {
        message: 'First pass with the 30 rpm roll motors of the other stations',
        set: { '/variables': 'flipRate = 2 rad/s\nbaseLimit = 2.5 rad/s\npivotLimit = 6 rad/s\nrollLimit = 30 rpm' },
      },
    ],
    latest: 'Roll motors on this station are the older 15 rpm type: fan-2 and fan-3 are over their limit',
  },
};

/**
 * The sheet the demo list opens on (latest change first): written after every other demo sheet and fork, so
 * a first look meets non-zero rates, a warning worth reading, variables and notes.
 */
export const DEMO_OPENING_SHEET = 'line4-capsule-pin-flip.json';

/** Forks of demo sheets: a copy of the origin's revision, then the edits as later revisions. */
const DEMO_FORKS: { from: string; revision: number; title: string; edits: DemoEdit[] }[] = [
  {
    from: 'line4-peg-tilt.json',
    revision: 3,
    title: 'Peg: tilt with 16 mm rollers',
    edits: [
      {
        message: '16 mm rollers; roller centres, pivots and roll spindles moved out 2 mm to keep contact',
        set: {
          '/title': 'Peg: tilt with 16 mm rollers',
          '/hand/fingers/0/roller/radius': '16 mm',
          '/hand/fingers/0/roller/center/0': '-24 mm',
          '/hand/fingers/0/joints/1/point/0': '-24 mm',
          '/hand/fingers/0/joints/2/point/0': '-24 mm',
          '/hand/fingers/1/roller/radius': '16 mm',
          '/hand/fingers/1/roller/center/0': '24 mm',
          '/hand/fingers/1/joints/1/point/0': '24 mm',
          '/hand/fingers/1/joints/2/point/0': '24 mm',
        },
      },
    ],
  },
];

/** Shipped sheets that began as a fork of another shipped sheet: their first revision is the origin's copy. */
const DEMO_FORKED_FILES: Record<string, { from: string; revision: number; message: string }> = {
  'line4-retrofit-finger-review.json': {
    from: 'line4-bearing-housing-quarter-turn.json',
    revision: 1,
    message: 'Retrofit fingers fitted as found on the cell: three mounting faults',
  },
};

/** A remark the demo checker leaves on a signed revision, with the author's replies and whether the thread is resolved. */
interface DemoRemark {
  anchor: string;
  body: string;
  replies: string[];
  resolved: boolean;
}

/** The demo checker's signatures: one revision checked, one returned for correction with remarks. */
const DEMO_CHECKING: { file: string; revision: number; verdict: 'checked' | 'returned'; note: string; remarks: DemoRemark[] }[] = [
  {
    file: 'line4-peg-tilt.json',
    revision: 3,
    verdict: 'checked',
    note: 'Roll rates recomputed by hand for the tilt; both fingers agree with the sheet.',
    remarks: [
      {
        anchor: 'results',
        body: 'Left roll rate checked by hand as $\\dot\\theta_r = v_t / r$ (tangential contact speed over roller radius): agrees with the results.',
        replies: ['Thanks, same figure from the controller trace.'],
        resolved: true,
      },
    ],
  },
  {
    file: 'line4-retrofit-finger-review.json',
    revision: 2,
    verdict: 'returned',
    note: 'Returned: the mounting faults change the contact normals; see the remarks on the hand and the results.',
    remarks: [
      {
        anchor: 'hand',
        body: 'The north finger\'s pivot point is entered **1.5 mm** off the mounting drawing. Please correct it before the roll rates are read.',
        replies: ['Measured on the cell, not the drawing; I will add the drawing value as a second case.'],
        resolved: false,
      },
      {
        anchor: 'results',
        body: 'The pivot rates run close to their limit through the turn: is $\\omega_{max} = 6$ rad/s the retrofit motor\'s figure?',
        replies: [],
        resolved: false,
      },
    ],
  },
];

const DAY = 24 * 60 * 60 * 1000;

/** A copy of `document` with each JSON pointer in `set` given its value. */
function applyEdit(document: unknown, set: Record<string, unknown> = {}): unknown {
  const copy = structuredClone(document) as Record<string, unknown>;
  for (const [pointer, value] of Object.entries(set)) {
    const keys = pointer.slice(1).split('/');
    let node: Record<string, unknown> = copy;
    for (const key of keys.slice(0, -1)) node = node[key] as Record<string, unknown>;
    node[keys[keys.length - 1]] = value;
  }
  return copy;
}

/** A demo revision's document and summary, checked as every stored revision is. */
function checkedRevision(name: string, document: unknown) {
  const checked = checkDocument(document);
  if (!checked.ok) throw new Error(`Demo sheet ${name} is invalid: ${checked.error.path}: ${checked.error.message}`);
  return { inputs: checked.value.stored, summary: checked.value.summary };
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

/** A demo log's bytes as an upload would have sent them (gzip-compressed when the demo says so). */
interface PreparedDemoLog {
  sheetFile: string;
  fileName: string;
  contentType: 'text/csv' | 'application/gzip';
  bytes: Uint8Array;
  storageKey: string;
  id: string;
}

/**
 * Writes the demo controller logs into the log storage before the seed's transaction, so that
 * their rows are inserted with everything else or not at all; the caller removes the stored bytes
 * if the transaction fails.
 */
async function storeDemoLogs(storage: LogStorage, teamId: string, documents: Map<string, unknown>): Promise<PreparedDemoLog[]> {
  const prepared: PreparedDemoLog[] = [];
  for (const log of DEMO_LOGS) {
    const document = documents.get(log.sheetFile);
    if (!document) continue;
    const checked = checkDocument(document);
    if (!checked.ok) throw new Error(`Demo sheet ${log.sheetFile} is invalid: ${checked.error.path}: ${checked.error.message}`);
    const text = new TextEncoder().encode(demoLogText(checked.value.doc, log));
    const bytes = log.gzip ? new Uint8Array(gzipSync(text)) : text;
    const id = randomUUID();
    const entry: PreparedDemoLog = { sheetFile: log.sheetFile, fileName: log.fileName, contentType: log.gzip ? 'application/gzip' : 'text/csv', bytes, storageKey: `${teamId}/${id}`, id };
    prepared.push(entry);
    await storage.put(entry.storageKey, Readable.from([bytes]));
  }
  return prepared;
}

/**
 * Seeds the invented demo team, its users in every role, its sheets and (given a log storage) its
 * controller logs, only into an empty database.
 */
export async function seedDemoData(database: Database, sheetsFolder = DEMO_SHEETS_FOLDER, logStorage?: LogStorage): Promise<SeedOutcome> {
  const existingUsers = await countUsers(database);
  const [{ n: existingTeams }] = await database.db.select({ n: count() }).from(teams);
  if (existingUsers > 0 || existingTeams > 0) return { seeded: false, users: 0, sheets: 0, logs: 0 };

  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const demoSheets = readDemoSheets(sheetsFolder);
  let sheetCount = 0;
  // The team's id is chosen here because the logs' storage keys carry it and are written before the transaction.
  const teamId = randomUUID();
  const demoLogs = logStorage ? await storeDemoLogs(logStorage, teamId, new Map(demoSheets.map(({ file, document }) => [file, document]))) : [];
  try {
    await database.transaction(async (tx) => {
      // Demo history is spread over the past weeks so that lists sort and histories read naturally; the team
      // and its people exist from its first moment, before any of their sheets.
      let clock = Date.now() - 30 * DAY;
      const tick = () => new Date((clock += DAY / 3));
      const founded = new Date(clock);
      const [team] = await tx.insert(teams).values({ id: teamId, ...DEMO_TEAM, createdAt: founded }).returning();
      const created = await createUsers(
        tx,
        DEMO_USERS.map((u) => ({ name: u.name, email: u.email, passwordHash, emailVerified: founded, createdAt: founded })),
      );
      await tx.insert(memberships).values(
        created.map((user, i) => ({ teamId: team.id, userId: user.id, role: DEMO_USERS[i].role, createdAt: founded })),
      );
      const author = created[DEMO_USERS.findIndex((u) => u.role === 'editor')];
      const owner = created[DEMO_USERS.findIndex((u) => u.role === 'owner')];
      const stored = new Map<string, { sheetId: string; revisions: unknown[] }>();

      const insertSheet = async (
        name: string,
        title: string,
        tags: string[],
        revisions: { document: unknown; message: string }[],
        forkedFrom?: { sheetId: string; revision: number },
      ) => {
        const times = revisions.map(() => tick());
        const [sheet] = await tx
          .insert(sheets)
          .values({
            teamId: team.id,
            title,
            tags,
            latestRevision: revisions.length,
            createdBy: forkedFrom ? owner.id : author.id,
            forkedFromSheetId: forkedFrom?.sheetId ?? null,
            forkedFromRevision: forkedFrom?.revision ?? null,
            createdAt: times[0],
            updatedAt: times[times.length - 1],
          })
          .returning();
        await tx.insert(sheetRevisions).values(
          revisions.map((revision, i) => ({
            sheetId: sheet.id,
            number: i + 1,
            parentRevision: i === 0 ? null : i,
            ...checkedRevision(`${name} revision ${i + 1}`, revision.document),
            message: revision.message,
            authorId: forkedFrom ? owner.id : author.id,
            createdAt: times[i],
          })),
        );
        stored.set(name, { sheetId: sheet.id, revisions: revisions.map((r) => r.document) });
      };

      const insertShipped = async ({ file, document }: { file: string; document: DemoSheetFile }) => {
        const history = DEMO_HISTORY[file];
        const revisions = history
          ? [...history.earlier.map((edit) => ({ document: applyEdit(document, edit.set), message: edit.message })), { document, message: history.latest }]
          : [{ document, message: 'Demo sheet' }];
        const origin = DEMO_FORKED_FILES[file];
        const source = origin ? stored.get(origin.from) : undefined;
        if (origin && source) {
          revisions.unshift({ document: source.revisions[origin.revision - 1], message: `Derived from rev ${origin.revision}` });
          revisions[1].message = origin.message;
        }
        await insertSheet(file, document.title ?? file.replace(/\.json$/, ''), document.tags ?? [], revisions, source && origin ? { sheetId: source.sheetId, revision: origin.revision } : undefined);
      };
      for (const shipped of demoSheets) if (shipped.file !== DEMO_OPENING_SHEET) await insertShipped(shipped);
      for (const fork of DEMO_FORKS) {
        const source = stored.get(fork.from);
        if (!source) continue;
        const copied = source.revisions[fork.revision - 1];
        const revisions = [{ document: copied, message: `Derived from rev ${fork.revision}` }];
        for (const edit of fork.edits) revisions.push({ document: applyEdit(revisions[revisions.length - 1].document, edit.set), message: edit.message });
        const tags = (copied as DemoSheetFile).tags ?? [];
        await insertSheet(`${fork.from} fork`, fork.title, tags, revisions, { sheetId: source.sheetId, revision: fork.revision });
      }
      const opening = demoSheets.find((shipped) => shipped.file === DEMO_OPENING_SHEET);
      if (opening) await insertShipped(opening);
      const checker = created[DEMO_USERS.findIndex((u) => u.role === 'reviewer')];
      for (const check of DEMO_CHECKING) {
        const sheet = stored.get(check.file);
        if (!sheet) continue;
        const revisionAuthor = DEMO_FORKED_FILES[check.file] ? owner : author;
        const signedAt = tick();
        await tx.insert(reviews).values({ sheetId: sheet.sheetId, revision: check.revision, reviewerId: checker.id, verdict: check.verdict, body: check.note, createdAt: signedAt });
        await tx
          .update(sheetRevisions)
          .set({ reviewState: check.verdict })
          .where(and(eq(sheetRevisions.sheetId, sheet.sheetId), eq(sheetRevisions.number, check.revision)));
        for (const remark of check.remarks) {
          const [opening] = await tx
            .insert(comments)
            .values({ sheetId: sheet.sheetId, revision: check.revision, authorId: checker.id, anchor: remark.anchor, body: remark.body, createdAt: signedAt })
            .returning({ id: comments.id });
          for (const reply of remark.replies) {
            await tx.insert(comments).values({ sheetId: sheet.sheetId, revision: check.revision, authorId: revisionAuthor.id, anchor: remark.anchor, body: reply, parentId: opening.id, createdAt: tick() });
          }
          // A thread is resolved after its last reply.
          if (remark.resolved) await tx.update(comments).set({ resolvedAt: tick(), resolvedById: checker.id }).where(eq(comments.id, opening.id));
        }
      }
      for (const log of demoLogs) {
        const sheet = stored.get(log.sheetFile);
        if (!sheet) continue;
        await tx.insert(uploads).values({
          id: log.id,
          teamId: team.id,
          sheetId: sheet.sheetId,
          uploaderId: author.id,
          fileName: log.fileName,
          contentType: log.contentType,
          byteSize: log.bytes.byteLength,
          sha256: createHash('sha256').update(log.bytes).digest('hex'),
          storageKey: log.storageKey,
          createdAt: tick(),
        });
      }
      sheetCount = stored.size;
      await tx.insert(auditEvents).values({ teamId: team.id, action: 'demo.seed', detail: { sheets: sheetCount, logs: demoLogs.length } });
    });
  } catch (error) {
    for (const log of demoLogs) await logStorage!.delete(log.storageKey);
    throw error;
  }
  return { seeded: true, users: DEMO_USERS.length, sheets: sheetCount, logs: demoLogs.length };
}
