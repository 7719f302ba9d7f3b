import { z } from 'zod';
import { route } from '@/lib/http/route';
import { fitOnCheck, FitRequestSchema } from '@/lib/services/accessories';

/**
 * POST /api/checks/{id}/fit — an accessory on a finished check:
 *   {mode: 'place', accessoryId | spec, at: 'insert C4', turnDeg} → {result: fits, marginMm, pins, binding}
 *   {mode: 'map', accessoryId | spec, turns?} → {cells: [{at, turnDeg, status, marginMm}], fits, binds}
 *   {mode: 'board', boardCheckId, dc?, dr?} → does the board measured in that check drop onto this bed?
 * Lengths in mm. Any member may ask (it changes nothing).
 */
export const POST = route({ params: z.object({ id: z.string().min(1).max(64) }), body: FitRequestSchema }, async ({ db, actor, params, body }) => fitOnCheck(db, actor, params.id, body));
