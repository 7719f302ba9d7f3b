/**
 * Gridproof's database schema (SQLite / libSQL through Drizzle).
 *
 * Conventions: ids are random text (UUID v4); every time is an integer of milliseconds since the Unix epoch
 * (UTC); JSON documents are stored as text and validated with zod where they are read. Lengths stored in
 * columns are millimetres (suffix `Mm`); image coordinates are pixels (suffix `Px`).
 */
import { sql } from 'drizzle-orm';
import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';

export const ROLES = ['owner', 'machinist', 'reviewer'] as const;
export type Role = (typeof ROLES)[number];

export const CHECK_STATUSES = ['queued', 'running', 'needs-review', 'done', 'failed'] as const;
export type CheckStatus = (typeof CHECK_STATUSES)[number];

export const JOB_STATUSES = ['queued', 'running', 'done', 'failed'] as const;

const createdAt = () => integer('created_at').notNull().default(sql`(unixepoch('subsec') * 1000)`);

export const users = sqliteTable('users', {
  id: text('id').primaryKey(),
  email: text('email').notNull(),
  name: text('name').notNull(),
  passwordHash: text('password_hash').notNull(),
  /** Preferred display units for reports. */
  units: text('units', { enum: ['mm', 'in'] }).notNull().default('mm'),
  createdAt: createdAt(),
  passwordChangedAt: integer('password_changed_at'),
}, (t) => [uniqueIndex('users_email_unique').on(t.email)]);

/** Server-side sessions: the sealed cookie names one of these; sign-out and password change revoke it. */
export const sessions = sqliteTable('sessions', {
  id: text('id').primaryKey(),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  createdAt: createdAt(),
  lastSeenAt: integer('last_seen_at'),
  expiresAt: integer('expires_at').notNull(),
  revokedAt: integer('revoked_at'),
  ip: text('ip'),
  userAgent: text('user_agent'),
}, (t) => [index('sessions_user_idx').on(t.userId)]);

export const workshops = sqliteTable('workshops', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  createdAt: createdAt(),
  /** True for the seeded demo workshop. */
  demo: integer('demo', { mode: 'boolean' }).notNull().default(false),
});

export const memberships = sqliteTable('memberships', {
  workshopId: text('workshop_id').notNull().references(() => workshops.id, { onDelete: 'cascade' }),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  role: text('role', { enum: ROLES }).notNull(),
  createdAt: createdAt(),
}, (t) => [primaryKey({ columns: [t.workshopId, t.userId] }), index('memberships_user_idx').on(t.userId)]);

export const beds = sqliteTable('beds', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').notNull().references(() => workshops.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  notes: text('notes'),
  /** The pattern version in force (patterns.id). */
  currentPatternId: text('current_pattern_id'),
  createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  updatedAt: integer('updated_at'),
}, (t) => [index('beds_workshop_idx').on(t.workshopId)]);

/** Every saved version of a bed's nominal pattern (JSON of the measurement core's contract). */
export const patterns = sqliteTable('patterns', {
  id: text('id').primaryKey(),
  bedId: text('bed_id').notNull().references(() => beds.id, { onDelete: 'cascade' }),
  revision: integer('revision').notNull(),
  presetId: text('preset_id'),
  json: text('json').notNull(),
  createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('patterns_bed_revision_unique').on(t.bedId, t.revision)]);

/** Uploaded originals; one row per distinct content within a workshop. */
export const photos = sqliteTable('photos', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').notNull().references(() => workshops.id, { onDelete: 'cascade' }),
  bedId: text('bed_id').references(() => beds.id, { onDelete: 'set null' }),
  sha256: text('sha256').notNull(),
  storageKey: text('storage_key').notNull(),
  contentType: text('content_type').notNull(),
  byteSize: integer('byte_size').notNull(),
  widthPx: integer('width_px'),
  heightPx: integer('height_px'),
  /** Why no display copy could be made of this photo (undecodable, too many pixels…), or null. */
  previewError: text('preview_error'),
  originalName: text('original_name'),
  uploadedBy: text('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('photos_workshop_sha_unique').on(t.workshopId, t.sha256)]);

export const checks = sqliteTable('checks', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').notNull().references(() => workshops.id, { onDelete: 'cascade' }),
  bedId: text('bed_id').notNull().references(() => beds.id, { onDelete: 'cascade' }),
  photoId: text('photo_id').references(() => photos.id, { onDelete: 'set null' }),
  patternId: text('pattern_id').notNull().references(() => patterns.id),
  title: text('title'),
  referenceMm: real('reference_mm').notNull(),
  /** User-given reference corners [[x,y]×4] in image px, or null to detect them. */
  cornersJson: text('corners_json'),
  /**
   * Measured distances between two positions given with the upload (`[{ from, to, mm, sigmaMm }]`, labels as the
   * report writes them, mm), combined with the reference square in the fit; null when none were given.
   */
  distancesJson: text('distances_json'),
  status: text('status', { enum: CHECK_STATUSES }).notNull().default('queued'),
  stage: text('stage'),
  progress: real('progress').notNull().default(0),
  error: text('error'),
  analysisVersion: integer('analysis_version').notNull().default(1),
  /**
   * The photo-quality stage's verdict (report contract `PhotoQuality`), written by the worker before it looks for
   * the holes, so that the check's page shows it before the full result; null until then.
   */
  qualityJson: text('quality_json'),
  /** Detections in the measurement core's points format (image px). */
  detectionsJson: text('detections_json'),
  /** The report JSON of the measurement core's contract. */
  reportJson: text('report_json'),
  /**
   * Bumped by the `checks_report_rev` trigger (drizzle/0002) whenever report_json changes, whoever writes it:
   * (id, reportRev) names one report text, so a process can keep the parsed report without re-reading it.
   */
  reportRev: integer('report_rev').notNull().default(0),
  /** Review edits (moved corners, added/removed holes), with who and when. */
  editsJson: text('edits_json'),
  editedBy: text('edited_by').references(() => users.id, { onDelete: 'set null' }),
  editedAt: integer('edited_at'),
  verdict: text('verdict'),
  rmsMm: real('rms_mm'),
  maxMm: real('max_mm'),
  outCount: integer('out_count'),
  matchedCount: integer('matched_count'),
  missingCount: integer('missing_count'),
  createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  updatedAt: integer('updated_at'),
  finishedAt: integer('finished_at'),
}, (t) => [index('checks_bed_idx').on(t.bedId, t.createdAt), index('checks_workshop_idx').on(t.workshopId)]);

/** One row per nominal position of a finished check (denormalised from the report for queries). */
export const checkPositions = sqliteTable('check_positions', {
  checkId: text('check_id').notNull().references(() => checks.id, { onDelete: 'cascade' }),
  family: text('family').notNull(),
  col: integer('col').notNull(),
  row: integer('row').notNull(),
  label: text('label').notNull(),
  panelId: text('panel_id'),
  nominalXMm: real('nominal_x_mm').notNull(),
  nominalYMm: real('nominal_y_mm').notNull(),
  measuredXMm: real('measured_x_mm'),
  measuredYMm: real('measured_y_mm'),
  dxMm: real('dx_mm'),
  dyMm: real('dy_mm'),
  rMm: real('r_mm'),
  uncertaintyMm: real('uncertainty_mm'),
  verdict: text('verdict').notNull(),
}, (t) => [primaryKey({ columns: [t.checkId, t.family, t.col, t.row] })]);

export const panelResults = sqliteTable('panel_results', {
  checkId: text('check_id').notNull().references(() => checks.id, { onDelete: 'cascade' }),
  panelId: text('panel_id').notNull(),
  dxMm: real('dx_mm').notNull(),
  dyMm: real('dy_mm').notNull(),
  rotationDeg: real('rotation_deg').notNull(),
  positions: integer('positions').notNull(),
  uncertaintyMm: real('uncertainty_mm'),
}, (t) => [primaryKey({ columns: [t.checkId, t.panelId] })]);

/** The work queue. Claimed with one atomic UPDATE … RETURNING and a random lock token. */
export const jobs = sqliteTable('jobs', {
  id: text('id').primaryKey(),
  kind: text('kind').notNull(),
  checkId: text('check_id').references(() => checks.id, { onDelete: 'cascade' }),
  payloadJson: text('payload_json').notNull().default('{}'),
  status: text('status', { enum: JOB_STATUSES }).notNull().default('queued'),
  attempts: integer('attempts').notNull().default(0),
  maxAttempts: integer('max_attempts').notNull().default(4),
  /** Earliest time the job may be claimed (backoff), ms. */
  runAt: integer('run_at').notNull(),
  lockToken: text('lock_token'),
  lockedBy: text('locked_by'),
  leaseExpiresAt: integer('lease_expires_at'),
  lastError: text('last_error'),
  createdAt: createdAt(),
  updatedAt: integer('updated_at'),
  finishedAt: integer('finished_at'),
}, (t) => [
  index('jobs_claim_idx').on(t.status, t.runAt),
  // the claim's second arm: running jobs whose lease has run out
  index('jobs_lease_idx').on(t.status, t.leaseExpiresAt),
  index('jobs_check_idx').on(t.checkId),
]);

export const shareLinks = sqliteTable('share_links', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').notNull().references(() => workshops.id, { onDelete: 'cascade' }),
  checkId: text('check_id').notNull().references(() => checks.id, { onDelete: 'cascade' }),
  /** SHA-256 of the token, hex; the token itself is never stored. */
  tokenHash: text('token_hash').notNull(),
  createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  expiresAt: integer('expires_at').notNull(),
  revokedAt: integer('revoked_at'),
  viewCount: integer('view_count').notNull().default(0),
  lastViewedAt: integer('last_viewed_at'),
  /** Who the link is for, in words: the address a sent link went to, or what its maker wrote; null when neither. */
  label: text('label'),
}, (t) => [uniqueIndex('share_links_token_unique').on(t.tokenHash), index('share_links_check_idx').on(t.checkId)]);

export const invitations = sqliteTable('invitations', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').notNull().references(() => workshops.id, { onDelete: 'cascade' }),
  email: text('email').notNull(),
  role: text('role', { enum: ROLES }).notNull(),
  tokenHash: text('token_hash').notNull(),
  invitedBy: text('invited_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  expiresAt: integer('expires_at').notNull(),
  acceptedAt: integer('accepted_at'),
  acceptedBy: text('accepted_by').references(() => users.id, { onDelete: 'set null' }),
  revokedAt: integer('revoked_at'),
}, (t) => [uniqueIndex('invitations_token_unique').on(t.tokenHash), index('invitations_workshop_idx').on(t.workshopId)]);

export const passwordResets = sqliteTable('password_resets', {
  id: text('id').primaryKey(),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  tokenHash: text('token_hash').notNull(),
  createdAt: createdAt(),
  expiresAt: integer('expires_at').notNull(),
  usedAt: integer('used_at'),
}, (t) => [uniqueIndex('password_resets_token_unique').on(t.tokenHash)]);

export const comments = sqliteTable('comments', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').notNull().references(() => workshops.id, { onDelete: 'cascade' }),
  checkId: text('check_id').notNull().references(() => checks.id, { onDelete: 'cascade' }),
  authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
  /** A position label such as `dog B3`, or null for a comment on the whole check. */
  positionLabel: text('position_label'),
  body: text('body').notNull(),
  createdAt: createdAt(),
}, (t) => [index('comments_check_idx').on(t.checkId, t.createdAt)]);

/** A workshop's accessory library: pins or bolts at offsets (JSON spec of the measurement core). */
export const accessories = sqliteTable('accessories', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').notNull().references(() => workshops.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  presetId: text('preset_id'),
  specJson: text('spec_json').notNull(),
  createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
}, (t) => [index('accessories_workshop_idx').on(t.workshopId)]);

/** Outgoing mail: written in the same transaction as what caused it, delivered by the mailer. */
export const outgoingMail = sqliteTable('outgoing_mail', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').references(() => workshops.id, { onDelete: 'set null' }),
  kind: text('kind').notNull(),
  toAddress: text('to_address').notNull(),
  subject: text('subject').notNull(),
  text: text('text').notNull(),
  html: text('html'),
  status: text('status', { enum: ['queued', 'sent', 'failed'] }).notNull().default('queued'),
  attempts: integer('attempts').notNull().default(0),
  error: text('error'),
  messageId: text('message_id'),
  createdAt: createdAt(),
  sentAt: integer('sent_at'),
}, (t) => [index('outgoing_mail_status_idx').on(t.status)]);

export const auditEvents = sqliteTable('audit_events', {
  id: text('id').primaryKey(),
  workshopId: text('workshop_id').references(() => workshops.id, { onDelete: 'cascade' }),
  actorId: text('actor_id').references(() => users.id, { onDelete: 'set null' }),
  action: text('action').notNull(),
  targetType: text('target_type'),
  targetId: text('target_id'),
  detailJson: text('detail_json'),
  ip: text('ip'),
  createdAt: createdAt(),
}, (t) => [index('audit_events_workshop_idx').on(t.workshopId, t.createdAt)]);

/** Fixed-window counters for rate limits, shared by every web instance. */
export const rateLimits = sqliteTable('rate_limits', {
  key: text('key').primaryKey(),
  count: integer('count').notNull(),
  resetAt: integer('reset_at').notNull(),
  /** No further attempt is admitted before this time, ms (the growing delay of a sign-in pair), or null. */
  blockedUntil: integer('blocked_until'),
});
