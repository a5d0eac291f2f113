import { sql } from 'drizzle-orm';
import { index, integer, primaryKey, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { REVIEW_STATES, type ReviewState } from '../lib/contract/reviews';
import { ROLES } from '../lib/roles';
import type { MatrixResult } from '../lib/sheet/matrix';
import type { SheetSummary, StoredDocument } from '../lib/sheet/summary';

const id = () =>
  text('id')
    .primaryKey()
    .$defaultFn(() => crypto.randomUUID());
const createdAt = () =>
  integer('created_at', { mode: 'timestamp_ms' })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);


export { REVIEW_STATES, type ReviewState };

/* Auth.js tables: names and columns follow @auth/drizzle-adapter's SQLite defaults. */

export const users = sqliteTable('user', {
  id: id(),
  name: text('name'),
  email: text('email').unique(),
  emailVerified: integer('emailVerified', { mode: 'timestamp_ms' }),
  image: text('image'),
  passwordHash: text('password_hash'),
  /** Sessions signed in before this moment are refused: set when the password changes or is reset. */
  sessionsValidFrom: integer('sessions_valid_from', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
});

export const accounts = sqliteTable(
  'account',
  {
    userId: text('userId')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    type: text('type').notNull(),
    provider: text('provider').notNull(),
    providerAccountId: text('providerAccountId').notNull(),
    refresh_token: text('refresh_token'),
    access_token: text('access_token'),
    expires_at: integer('expires_at'),
    token_type: text('token_type'),
    scope: text('scope'),
    id_token: text('id_token'),
    session_state: text('session_state'),
  },
  (account) => [primaryKey({ columns: [account.provider, account.providerAccountId] })],
);

export const sessions = sqliteTable('session', {
  sessionToken: text('sessionToken').primaryKey(),
  userId: text('userId')
    .notNull()
    .references(() => users.id, { onDelete: 'cascade' }),
  expires: integer('expires', { mode: 'timestamp_ms' }).notNull(),
});

export const verificationTokens = sqliteTable(
  'verificationToken',
  {
    identifier: text('identifier').notNull(),
    token: text('token').notNull(),
    expires: integer('expires', { mode: 'timestamp_ms' }).notNull(),
  },
  (vt) => [primaryKey({ columns: [vt.identifier, vt.token] })],
);

/* Slipless tables. */

/** Small key-value facts about this database, e.g. when the app last started on it. */
export const appMeta = sqliteTable('app_meta', {
  key: text('key').primaryKey(),
  value: text('value').notNull(),
});

export const teams = sqliteTable('teams', {
  id: id(),
  slug: text('slug').notNull().unique(),
  name: text('name').notNull(),
  createdAt: createdAt(),
});

export const memberships = sqliteTable(
  'memberships',
  {
    teamId: text('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: text('role', { enum: ROLES }).notNull(),
    createdAt: createdAt(),
  },
  (m) => [primaryKey({ columns: [m.teamId, m.userId] })],
);

export const sheets = sqliteTable(
  'sheets',
  {
    id: id(),
    teamId: text('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    title: text('title').notNull(),
    tags: text('tags', { mode: 'json' }).$type<string[]>().notNull().default(sql`'[]'`),
    latestRevision: integer('latest_revision').notNull().default(0),
    forkedFromSheetId: text('forked_from_sheet_id'),
    forkedFromRevision: integer('forked_from_revision'),
    createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
    deletedAt: integer('deleted_at', { mode: 'timestamp_ms' }),
    createdAt: createdAt(),
    updatedAt: integer('updated_at', { mode: 'timestamp_ms' })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (s) => [index('sheets_team_idx').on(s.teamId, s.updatedAt)],
);

export const sheetRevisions = sqliteTable(
  'sheet_revisions',
  {
    id: id(),
    sheetId: text('sheet_id')
      .notNull()
      .references(() => sheets.id, { onDelete: 'cascade' }),
    number: integer('number').notNull(),
    parentRevision: integer('parent_revision'),
    inputs: text('inputs', { mode: 'json' }).$type<StoredDocument>().notNull(),
    summary: text('summary', { mode: 'json' }).$type<SheetSummary>(),
    message: text('message').notNull().default(''),
    authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
    /** The latest signature on this revision; a sheet's state is its latest revision's, so a check never covers later saves. */
    reviewState: text('review_state', { enum: REVIEW_STATES }).notNull().default('draft'),
    createdAt: createdAt(),
  },
  (r) => [
    uniqueIndex('sheet_revisions_number_idx').on(r.sheetId, r.number),
    // The sheet list's "last checked revision" is a max over a sheet's checked revisions: without this it read every revision of every listed sheet.
    index('sheet_revisions_review_idx').on(r.sheetId, r.reviewState, r.number),
  ],
);

export const comments = sqliteTable('comments', {
  id: id(),
  sheetId: text('sheet_id')
    .notNull()
    .references(() => sheets.id, { onDelete: 'cascade' }),
  revision: integer('revision').notNull(),
  authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
  anchor: text('anchor'),
  body: text('body').notNull(),
  /** The remark this one answers; replies stay on their thread's revision. */
  parentId: text('parent_id'),
  resolvedAt: integer('resolved_at', { mode: 'timestamp_ms' }),
  resolvedById: text('resolved_by_id').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
});

export const reviews = sqliteTable('reviews', {
  id: id(),
  sheetId: text('sheet_id')
    .notNull()
    .references(() => sheets.id, { onDelete: 'cascade' }),
  revision: integer('revision').notNull(),
  reviewerId: text('reviewer_id').references(() => users.id, { onDelete: 'set null' }),
  verdict: text('verdict', { enum: ['checked', 'returned'] }).notNull(),
  body: text('body').notNull().default(''),
  createdAt: createdAt(),
});

export const uploads = sqliteTable('uploads', {
  id: id(),
  teamId: text('team_id')
    .notNull()
    .references(() => teams.id, { onDelete: 'cascade' }),
  sheetId: text('sheet_id').references(() => sheets.id, { onDelete: 'set null' }),
  uploaderId: text('uploader_id').references(() => users.id, { onDelete: 'set null' }),
  fileName: text('file_name').notNull(),
  contentType: text('content_type').notNull(),
  byteSize: integer('byte_size').notNull(),
  sha256: text('sha256').notNull(),
  /** Where the log's bytes are, in the configured log storage (disk folder or S3 bucket); logs reach 500 MiB, too big for a row. */
  storageKey: text('storage_key').notNull().unique(),
  createdAt: createdAt(),
});

export const logComparisons = sqliteTable('log_comparisons', {
  id: id(),
  uploadId: text('upload_id')
    .notNull()
    .references(() => uploads.id, { onDelete: 'cascade' }),
  sheetId: text('sheet_id')
    .notNull()
    .references(() => sheets.id, { onDelete: 'cascade' }),
  revision: integer('revision').notNull(),
  columnMap: text('column_map', { mode: 'json' }).notNull(),
  status: text('status', { enum: ['pending', 'running', 'done', 'failed'] }).notNull().default('pending'),
  verdict: text('verdict', { enum: ['pass', 'fail'] }),
  result: text('result', { mode: 'json' }),
  createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
});

/** The test-matrix result of one sheet revision, computed on the server; computing again replaces it. */
export const matrixResults = sqliteTable(
  'matrix_results',
  {
    id: id(),
    revisionId: text('revision_id')
      .notNull()
      .references(() => sheetRevisions.id, { onDelete: 'cascade' }),
    result: text('result', { mode: 'json' }).$type<MatrixResult>().notNull(),
    /** Wall time of the computation on the server, ms. */
    elapsedMs: integer('elapsed_ms').notNull(),
    createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (r) => [uniqueIndex('matrix_results_revision_idx').on(r.revisionId)],
);

export const invitations = sqliteTable('invitations', {
  id: id(),
  teamId: text('team_id')
    .notNull()
    .references(() => teams.id, { onDelete: 'cascade' }),
  email: text('email').notNull(),
  role: text('role', { enum: ROLES }).notNull(),
  tokenHash: text('token_hash').notNull().unique(),
  invitedBy: text('invited_by').references(() => users.id, { onDelete: 'set null' }),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  acceptedAt: integer('accepted_at', { mode: 'timestamp_ms' }),
  revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
});

/** One-time password reset links; only the token's SHA-256 digest is kept. */
export const passwordResets = sqliteTable('password_resets', {
  id: id(),
  userId: text('user_id')
    .notNull()
    .references(() => users.id, { onDelete: 'cascade' }),
  tokenHash: text('token_hash').notNull().unique(),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  usedAt: integer('used_at', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
});

/** Mail kept by the local mailbox when no real relay is configured (development and demo). */
export const mailOutbox = sqliteTable(
  'mail_outbox',
  {
    id: id(),
    to: text('to').notNull(),
    subject: text('subject').notNull(),
    text: text('text').notNull(),
    html: text('html'),
    createdAt: createdAt(),
  },
  (m) => [index('mail_outbox_created_idx').on(m.createdAt)],
);

export const apiTokens = sqliteTable('api_tokens', {
  id: id(),
  teamId: text('team_id')
    .notNull()
    .references(() => teams.id, { onDelete: 'cascade' }),
  userId: text('user_id')
    .notNull()
    .references(() => users.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  role: text('role', { enum: ROLES }).notNull(),
  tokenHash: text('token_hash').notNull().unique(),
  lastUsedAt: integer('last_used_at', { mode: 'timestamp_ms' }),
  revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
});

export const auditEvents = sqliteTable(
  'audit_events',
  {
    id: id(),
    teamId: text('team_id').references(() => teams.id, { onDelete: 'cascade' }),
    actorId: text('actor_id').references(() => users.id, { onDelete: 'set null' }),
    action: text('action').notNull(),
    subject: text('subject'),
    detail: text('detail', { mode: 'json' }),
    address: text('address'),
    createdAt: createdAt(),
  },
  (e) => [index('audit_events_team_idx').on(e.teamId, e.createdAt)],
);

/**
 * Sessions ended on the server (signed out) before their cookie expires: a session id listed
 * here is refused even though its signed cookie is still valid. Rows may go once expired.
 */
export const endedSessions = sqliteTable(
  'ended_sessions',
  {
    sessionId: text('session_id').primaryKey(),
    userId: text('user_id').references(() => users.id, { onDelete: 'cascade' }),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    createdAt: createdAt(),
  },
  (s) => [index('ended_sessions_expires_idx').on(s.expiresAt)],
);

/**
 * Attempt counters shared by every app instance and kept across restarts (sign-in throttling
 * per address, per account and per account-and-address; e-mail link requests).
 */
export const rateLimits = sqliteTable(
  'rate_limits',
  {
    key: text('key').primaryKey(),
    hits: integer('hits').notNull(),
    windowStartedAt: integer('window_started_at', { mode: 'timestamp_ms' }).notNull(),
    blockedUntil: integer('blocked_until', { mode: 'timestamp_ms' }),
  },
  (r) => [index('rate_limits_window_idx').on(r.windowStartedAt)],
);

export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;
export type Team = typeof teams.$inferSelect;
export type Membership = typeof memberships.$inferSelect;
export type Sheet = typeof sheets.$inferSelect;
export type NewSheet = typeof sheets.$inferInsert;
export type SheetRevision = typeof sheetRevisions.$inferSelect;
export type NewSheetRevision = typeof sheetRevisions.$inferInsert;
export type AuditEvent = typeof auditEvents.$inferSelect;
export type Invitation = typeof invitations.$inferSelect;
export type OutboxMail = typeof mailOutbox.$inferSelect;
