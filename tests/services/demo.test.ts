import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listMembers } from '@/db/queries/memberships';
import { analyzePoints, patternToMm, presetById } from '@/lib/geometry';
import { makeScene } from '@/lib/geometry/synthetic';
import { listAccessories } from '@/lib/services/accessories';
import { placeAccessory } from '@/lib/services/accessories-placement';
import { signIn } from '@/lib/services/auth';
import { listBeds } from '@/lib/services/beds';
import { DEMO_ACCESSORIES, DEMO_LOGINS, DEMO_PASSWORD, seedDemo } from '@/lib/services/demo';
import { useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
let seeded: Awaited<ReturnType<typeof seedDemo>>;
beforeAll(async () => {
  t = await useFreshDatabase();
});
afterAll(async () => t.close());

describe('demo seed', () => {
  it('seeds an empty database once: owner and reviewer who can sign in, and beds with patterns', async () => {
    const first = await seedDemo(t.db);
    seeded = first;
    expect(first.seeded).toBe(true);
    expect((await seedDemo(t.db)).seeded).toBe(false);
    const members = await listMembers(t.db, first.workshopId!);
    expect(members.map((m) => m.role).sort()).toEqual(['owner', 'reviewer']);
    for (const login of DEMO_LOGINS) {
      const r = await signIn(t.db, { email: login.email, password: DEMO_PASSWORD });
      expect(r.workshopId).toBe(first.workshopId);
    }
    const owner = members.find((m) => m.role === 'owner')!;
    const beds = await listBeds(t.db, { user: { id: owner.userId, email: owner.email, name: owner.name, units: 'mm' }, workshopId: first.workshopId!, role: 'owner' });
    expect(beds.length).toBeGreaterThanOrEqual(1);
    expect(beds.every((b) => (b.pattern?.positions ?? 0) > 0)).toBe(true);
  });

  it('seeds a fence that fits on true inserts and a board that binds over the fresh plate\'s stray inserts until they are redrilled', async () => {
    const [owner] = (await listMembers(t.db, seeded.workshopId!)).filter((m) => m.role === 'owner');
    const actor = { user: { id: owner!.userId, email: owner!.email, name: owner!.name, units: 'mm' as const }, workshopId: seeded.workshopId!, role: 'owner' as const };
    const library = await listAccessories(t.db, actor);
    expect(library.map((a) => a.name).sort()).toEqual(DEMO_ACCESSORIES.map((a) => a.name).sort());
    const fence = library.find((a) => a.presetId === 'fence-two-bolt')!;
    const board = library.find((a) => a.presetId === 'sacrificial-board')!;
    // the demo's jig plate, as lib/services/demo-checks.ts builds it
    const pattern = presetById('m6-50')!.size({ bedWidthMm: 600, bedHeightMm: 400, stripWidthMm: 200 });
    const pm = patternToMm(pattern);
    // fresh install: four inserts of row 5 (cols 6–9) drilled 1.2 mm off; an M6 bolt has 0.3 mm radial clearance
    // in a medium-fit 6.6 mm hole (ISO 273), so an accessory bolted through any of them binds
    const family = pm.families[0]!;
    const index = (col: number, row: number) => row * family.count.x + col;
    const off = new Map<number, [number, number]>([6, 7, 8, 9].map((c) => [index(c, 5), [1.2, 0]]));
    // the reference square at the front left, clear of where the accessories go
    const scene = (extra?: Map<number, [number, number]>) => analyzePoints(makeScene({
      pattern, seed: 5, centreNoisePx: 0.03, cornerNoisePx: 0.03, missingFraction: 0, spuriousFraction: 0, panelShiftMm: 0,
      square: { sizeMm: 150, x: 110, y: 110, angleDeg: 4 }, extraDeviation: extra,
    }).points, pattern);
    const fresh = scene(off);
    const redrilled = scene();
    const at = (report: typeof fresh, col: number, row: number) => report.positions.find((p) => p.col === col && p.row === row)!.label;
    expect(placeAccessory(fence.spec, pm, fresh, at(fresh, 6, 1), 0).fits).toBe(true);
    expect(placeAccessory(board.spec, pm, fresh, at(fresh, 6, 4), 0).fits).toBe(false);
    expect(placeAccessory(board.spec, pm, redrilled, at(redrilled, 6, 4), 0).fits).toBe(true);
  });
});
