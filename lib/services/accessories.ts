/**
 * Accessory use cases: the workshop's library (from our presets or pins given by hand), and fitting an
 * accessory on a finished check — one placement (position + turn → fits or binds, margin, binding pins), the
 * map of every position and turn, and a sacrificial board measured in its own check against a bed.
 * Every read is scoped by the actor's workshop.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import * as q from '@/db/queries/accessories';
import { recordAudit } from '@/db/queries/audit';
import { invalidInput, notFound } from '@/lib/http/errors';
import {
  ACCESSORY_PRESETS, accessoryPresetById, AccessorySpecSchema, boardOnBed, PlacementError, placeAccessory, placementMap, TURNS,
  type AccessorySpec, type BoardOnBedResult, type MapCell, type PlacementResult,
} from './accessories-placement';
import { authorize, type Actor } from './actor';
import { loadCheckPattern, loadFinishedCheck } from './share-report';

export const AccessoryCreateSchema = z
  .object({
    name: z.string().trim().min(1, 'Name the accessory.').max(120),
    /** One of ACCESSORY_PRESETS with its settings … */
    preset: z.string().min(1).max(60).optional(),
    params: z.record(z.string(), z.unknown()).default({}),
    /** … or pins given by hand. */
    spec: AccessorySpecSchema.optional(),
  })
  .refine((a) => (a.preset === undefined) !== (a.spec === undefined), { path: ['preset'], message: 'Give either a preset or the pins (one of them).' });
export const AccessoryPatchSchema = z.object({ name: z.string().trim().min(1).max(120).optional(), spec: AccessorySpecSchema.optional() });

const Turn = z.coerce.number().refine((t): t is (typeof TURNS)[number] => (TURNS as readonly number[]).includes(t), 'Turn by 0, 90, 180 or 270 degrees.');
const Which = { accessoryId: z.string().min(1).max(64).optional(), spec: AccessorySpecSchema.optional() };
export const FitRequestSchema = z.union([
  z.object({ mode: z.literal('place').default('place'), ...Which, at: z.string().trim().min(1).max(40), turnDeg: Turn.default(0), searchDeg: z.number().min(0).max(5).optional() }),
  z.object({ mode: z.literal('map'), ...Which, turns: z.array(Turn).min(1).max(4).optional() }),
  z.object({ mode: z.literal('board'), boardCheckId: z.string().min(1).max(64), dc: z.number().int().min(-500).max(500).default(0), dr: z.number().int().min(-500).max(500).default(0) }),
]);
export type FitRequest = z.infer<typeof FitRequestSchema>;

export type AccessoryDto = { id: string; name: string; presetId: string | null; spec: AccessorySpec; createdAt: number };

function toDto(r: q.AccessoryRow): AccessoryDto {
  return { id: r.id, name: r.name, presetId: r.presetId, spec: AccessorySpecSchema.parse(JSON.parse(r.specJson)), createdAt: r.createdAt };
}

/** The presets and the parameters each takes (for the library page). */
export function listAccessoryPresets() {
  return ACCESSORY_PRESETS.map((p) => ({ id: p.id, name: p.name, description: p.description, fields: p.fields }));
}

export async function listAccessories(db: Db, actor: Actor): Promise<AccessoryDto[]> {
  authorize(actor, 'workshop:read');
  return (await q.listAccessories(db, actor.workshopId)).map(toDto);
}

export async function getAccessory(db: Db, actor: Actor, id: string): Promise<AccessoryDto> {
  authorize(actor, 'workshop:read');
  const row = await q.getAccessory(db, actor.workshopId, id);
  if (!row) throw notFound('accessory');
  return toDto(row);
}

function buildFromPreset(presetId: string, params: Record<string, unknown>): AccessorySpec {
  const preset = accessoryPresetById(presetId);
  if (!preset) throw invalidInput(`There is no accessory preset "${presetId}".`, { preset: 'Unknown preset.' });
  const parsed = preset.params.safeParse(params);
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const i of parsed.error.issues) fields[`params.${i.path.join('.')}`] ??= i.message;
    throw invalidInput('The preset\'s settings need attention.', fields);
  }
  try {
    return AccessorySpecSchema.parse(preset.build(parsed.data));
  } catch (e) {
    if (e instanceof RangeError) throw invalidInput(e.message, { params: e.message });
    throw e;
  }
}

export async function createAccessory(db: Db, actor: Actor, input: z.infer<typeof AccessoryCreateSchema>): Promise<AccessoryDto> {
  authorize(actor, 'accessory:write');
  const { spec, presetId } = input.preset !== undefined ? { spec: buildFromPreset(input.preset, input.params), presetId: input.preset } : { spec: input.spec!, presetId: null };
  const row = await db.transaction(async (tx) => {
    const r = await q.insertAccessory(tx, { workshopId: actor.workshopId, name: input.name, presetId, specJson: JSON.stringify(spec), createdBy: actor.user.id });
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'accessory.create', targetType: 'accessory', targetId: r.id, detail: { presetId } });
    return r;
  });
  return toDto(row);
}

export async function updateAccessory(db: Db, actor: Actor, id: string, input: z.infer<typeof AccessoryPatchSchema>): Promise<AccessoryDto> {
  authorize(actor, 'workshop:read');
  const current = await q.getAccessory(db, actor.workshopId, id);
  if (!current) throw notFound('accessory');
  authorize(actor, 'accessory:write');
  const row = await q.updateAccessory(db, actor.workshopId, id, { name: input.name ?? current.name, specJson: input.spec ? JSON.stringify(input.spec) : current.specJson });
  if (!row) throw notFound('accessory');
  return toDto(row);
}

export async function deleteAccessory(db: Db, actor: Actor, id: string): Promise<void> {
  authorize(actor, 'workshop:read');
  if (!(await q.getAccessory(db, actor.workshopId, id))) throw notFound('accessory');
  authorize(actor, 'accessory:write');
  await q.deleteAccessory(db, actor.workshopId, id);
  await recordAudit(db, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'accessory.delete', targetType: 'accessory', targetId: id });
}

async function specFor(db: Db, actor: Actor, r: { accessoryId?: string; spec?: AccessorySpec }): Promise<{ spec: AccessorySpec; name: string | null }> {
  if (r.spec) return { spec: r.spec, name: null };
  if (!r.accessoryId) throw invalidInput('Pick an accessory.', { accessoryId: 'Required.' });
  const a = await getAccessory(db, actor, r.accessoryId);
  return { spec: a.spec, name: a.name };
}

function asInput<T>(fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof PlacementError) throw invalidInput(e.message, e.field ? { [e.field]: e.message } : undefined);
    throw e;
  }
}

export type FitAnswer =
  | { mode: 'place'; accessory: string | null; result: PlacementResult }
  | { mode: 'map'; accessory: string | null; cells: MapCell[]; truncated: boolean; fits: number; binds: number }
  | { mode: 'board'; boardCheckId: string; result: BoardOnBedResult };

/** `POST /api/checks/{id}/fit`: one placement, the map of all placements, or a board check against this bed. */
export async function fitOnCheck(db: Db, actor: Actor, checkId: string, req: FitRequest): Promise<FitAnswer> {
  authorize(actor, 'workshop:read');
  const { check, report } = await loadFinishedCheck(db, actor.workshopId, checkId);
  const pattern = await loadCheckPattern(db, check);
  if (req.mode === 'board') {
    const board = await loadFinishedCheck(db, actor.workshopId, req.boardCheckId);
    const boardPattern = await loadCheckPattern(db, board.check);
    return { mode: 'board', boardCheckId: req.boardCheckId, result: asInput(() => boardOnBed(board.report, report, pattern, boardPattern, { dc: req.dc, dr: req.dr })) };
  }
  const { spec, name } = await specFor(db, actor, req);
  if (req.mode === 'place') return { mode: 'place', accessory: name, result: asInput(() => placeAccessory(spec, pattern, report, req.at, req.turnDeg, req.searchDeg)) };
  const map = asInput(() => placementMap(spec, pattern, report, { turns: req.turns }));
  return { mode: 'map', accessory: name, ...map, fits: map.cells.filter((c) => c.status === 'fits').length, binds: map.cells.filter((c) => c.status === 'binds').length };
}
