/**
 * Bed use cases. Each takes the actor first, authorises, and scopes every query by `actor.workshopId`:
 * a bed of another workshop is "not found" (404). A pattern is either a full Pattern JSON of the
 * measurement core's contract or `{ preset: ID }`; every change of pattern is saved as a new revision.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { recordAudit } from '@/db/queries/audit';
import * as q from '@/db/queries/beds';
import { insertPatternRevision, listPatternRevisions } from '@/db/queries/patterns';
import { PatternSchema, type HoleKind, type Pattern } from '@/lib/geometry/contract';
import { parseStoredJson } from '@/lib/stored-json';
import { invalidInput, notFound } from '@/lib/http/errors';
import { authorize, type Actor } from './actor';
import { buildPreset, PresetRefSchema, type PresetRef } from './presets';

/** A pattern in a request: full JSON, or a preset reference with the bed's size. */
export const PatternInputSchema = z.union([PresetRefSchema, PatternSchema]);
/** `preset` at the top level: an id (default bed size) or a reference with sizes. */
const TopPreset = z.union([z.string().min(1).max(80), PresetRefSchema]);

export const BedCreateSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the bed a name.').max(120),
    notes: z.string().trim().max(2000).optional(),
    pattern: PatternInputSchema.optional(),
    preset: TopPreset.optional(),
  })
  .refine((b) => (b.pattern === undefined) !== (b.preset === undefined), { path: ['pattern'], message: 'Give either a pattern or a preset (one of them).' });
export type BedCreateInput = z.infer<typeof BedCreateSchema>;

export const BedPatchSchema = z
  .object({
    name: z.string().trim().min(1).max(120).optional(),
    notes: z.string().trim().max(2000).nullable().optional(),
    pattern: PatternInputSchema.optional(),
    preset: TopPreset.optional(),
  })
  .refine((b) => !(b.pattern !== undefined && b.preset !== undefined), { path: ['pattern'], message: 'Give a pattern or a preset, not both.' });
export type BedPatchInput = z.infer<typeof BedPatchSchema>;

/** Turns a pattern input into a validated Pattern and the preset it came from. */
export function resolvePattern(input: { pattern?: z.infer<typeof PatternInputSchema>; preset?: string | PresetRef }): { pattern: Pattern; presetId: string | null } {
  const ref: PresetRef | undefined =
    typeof input.preset === 'string' ? { preset: input.preset } : (input.preset ?? (input.pattern && 'preset' in input.pattern ? input.pattern : undefined));
  if (ref !== undefined) {
    const built = buildPreset(ref);
    if (!built) throw invalidInput(`There is no preset "${ref.preset}".`, { preset: 'Unknown preset.' });
    return { pattern: built, presetId: ref.preset };
  }
  if (input.pattern && !('preset' in input.pattern)) return { pattern: input.pattern, presetId: null };
  throw invalidInput('Give a pattern or a preset.', { pattern: 'Required.' });
}

export type PatternSummary = {
  name: string;
  units: 'mm' | 'in';
  bed: { width: number; height: number };
  positions: number;
  panels: number;
  families: { id: string; kind: HoleKind; label: string; holeDiameter: number; pitch: { x: number; y: number }; count: { x: number; y: number }; positions: number; fit: string }[];
};

function describeFit(fit: Pattern['families'][number]['fit']): string {
  if ('toleranceMm' in fit) return `±${fit.toleranceMm} mm`;
  if ('fastener' in fit) return `${fit.fastener}, ${fit.clearance} clearance`;
  return `pin ⌀${fit.pinDiameter}`;
}

/** The few facts of a pattern a page shows (sizes in the pattern's own units). */
export function summarisePattern(p: Pattern): PatternSummary {
  const families = p.families.map((f) => ({
    id: f.id,
    kind: f.kind,
    label: f.label ?? f.kind.replace('-', ' '),
    holeDiameter: f.holeDiameter,
    pitch: f.pitch,
    count: f.count,
    positions: f.count.x * f.count.y,
    fit: describeFit(f.fit),
  }));
  return { name: p.name, units: p.units, bed: p.bed, positions: families.reduce((n, f) => n + f.positions, 0), panels: p.panels?.length ?? 0, families };
}

const parseStored = (json: string | null): Pattern | null => parseStoredJson(json, PatternSchema);

export type BedDto = {
  id: string;
  name: string;
  notes: string | null;
  createdAt: number;
  updatedAt: number | null;
  presetId: string | null;
  patternRevision: number | null;
  patternId: string | null;
  pattern: PatternSummary | null;
  lastCheck: { id: string; status: string; verdict: string | null; createdAt: number } | null;
  checkCount: number;
};

function toDto(b: q.BedWithPattern, last: q.CheckListRow | undefined, count: number): BedDto {
  const pattern = parseStored(b.patternJson);
  return {
    id: b.id,
    name: b.name,
    notes: b.notes,
    createdAt: b.createdAt,
    updatedAt: b.updatedAt,
    presetId: b.presetId,
    patternRevision: b.patternRevision,
    patternId: b.currentPatternId,
    pattern: pattern ? summarisePattern(pattern) : null,
    lastCheck: last ? { id: last.id, status: last.status, verdict: last.verdict, createdAt: last.createdAt } : null,
    checkCount: count,
  };
}

export async function listBeds(db: Db, actor: Actor): Promise<BedDto[]> {
  authorize(actor, 'workshop:read');
  const [rows, latest, counts] = await Promise.all([q.listBeds(db, actor.workshopId), q.latestChecksByBed(db, actor.workshopId), q.countChecksByBed(db, actor.workshopId)]);
  return rows.map((b) => toDto(b, latest.get(b.id), counts.get(b.id) ?? 0));
}

/** One bed with its full pattern, its revisions and its checks; 404 for another workshop's bed. */
export async function getBed(db: Db, actor: Actor, id: string) {
  authorize(actor, 'workshop:read');
  const b = await q.getBed(db, actor.workshopId, id);
  if (!b) throw notFound('bed');
  const [checks, revisions] = await Promise.all([q.listBedChecks(db, actor.workshopId, id), listPatternRevisions(db, id)]);
  return { bed: toDto(b, checks[0], checks.length), patternJson: parseStored(b.patternJson), checks, revisions };
}

export async function createBed(db: Db, actor: Actor, input: BedCreateInput): Promise<BedDto> {
  authorize(actor, 'bed:write');
  const { pattern, presetId } = resolvePattern(input);
  const id = await db.transaction(async (tx) => {
    const bed = await q.insertBed(tx, { workshopId: actor.workshopId, name: input.name, notes: input.notes ?? null, createdBy: actor.user.id });
    const rev = await insertPatternRevision(tx, { bedId: bed.id, json: JSON.stringify(pattern), presetId, createdBy: actor.user.id });
    await q.updateBed(tx, actor.workshopId, bed.id, { currentPatternId: rev.id });
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'bed.create', targetType: 'bed', targetId: bed.id, detail: { name: input.name, presetId } });
    return bed.id;
  });
  return (await getBed(db, actor, id)).bed;
}

export async function updateBed(db: Db, actor: Actor, id: string, input: BedPatchInput): Promise<BedDto> {
  authorize(actor, 'bed:write');
  const existing = await q.getBed(db, actor.workshopId, id);
  if (!existing) throw notFound('bed');
  await db.transaction(async (tx) => {
    let currentPatternId: string | undefined;
    if (input.pattern !== undefined || input.preset !== undefined) {
      const { pattern, presetId } = resolvePattern(input);
      currentPatternId = (await insertPatternRevision(tx, { bedId: id, json: JSON.stringify(pattern), presetId, createdBy: actor.user.id })).id;
    }
    await q.updateBed(tx, actor.workshopId, id, {
      ...(input.name !== undefined ? { name: input.name } : {}),
      ...(input.notes !== undefined ? { notes: input.notes || null } : {}),
      ...(currentPatternId ? { currentPatternId } : {}),
    });
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'bed.update', targetType: 'bed', targetId: id, detail: { fields: Object.keys(input) } });
  });
  return (await getBed(db, actor, id)).bed;
}

export async function deleteBed(db: Db, actor: Actor, id: string): Promise<void> {
  authorize(actor, 'workshop:read');
  const existing = await q.getBed(db, actor.workshopId, id);
  if (!existing) throw notFound('bed');
  authorize(actor, 'bed:delete');
  await db.transaction(async (tx) => {
    await q.deleteBed(tx, actor.workshopId, id);
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'bed.delete', targetType: 'bed', targetId: id, detail: { name: existing.name } });
  });
}
