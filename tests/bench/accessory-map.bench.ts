/**
 * Placement map speed: a two-bolt fence and an L-stop on a 1220 × 2440 mm bed of inserts at 100 mm pitch
 * (12 × 24 positions), every position at every turn, deviations drawn at random (σ 0.15 mm per axis, seeded).
 * Prints JSON: placements, ms in all, ms per placement, how many fit. `npx tsx tests/bench/accessory-map.bench.ts`
 */
import type { Pattern } from '@/lib/geometry/contract';
import { mulberry32 } from '@/lib/geometry/random';
import { patternToMm } from '@/lib/geometry/units';
import { accessoryPresetById, placementMap } from '@/lib/services/accessories-placement';
import { handReport } from '../services/share-fixtures';

const PATTERN: Pattern = {
  version: 1, name: 'bench bed', units: 'mm', bed: { width: 1220, height: 2440 },
  families: [{ id: 'ins', kind: 'threaded-insert', holeDiameter: 12, origin: { x: 60, y: 70 }, pitch: { x: 100, y: 100 }, count: { x: 12, y: 24 }, fit: { fastener: 'M8', clearance: 'medium' } }],
};
const rand = mulberry32(7);
const gauss = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
const dev: Record<string, [number, number]> = {};
for (let c = 0; c < 12; c++) for (let r = 0; r < 24; r++) dev[`insert ${String.fromCharCode(65 + c)}${r + 1}`] = [0.15 * gauss(), 0.15 * gauss()];
const report = handReport(PATTERN, dev);
const pm = patternToMm(PATTERN);
const out: Record<string, unknown>[] = [];
for (const [id, params] of [['fence-two-bolt', { spanSteps: 4 }], ['stop-l-three-bolt', {}]] as const) {
  const spec = accessoryPresetById(id)!.build(params);
  const t0 = performance.now();
  const { cells } = placementMap(spec, pm, report);
  const ms = performance.now() - t0;
  out.push({ accessory: id, placements: cells.length, ms: Math.round(ms), msPerPlacement: Number((ms / cells.length).toFixed(3)), fits: cells.filter((c) => c.status === 'fits').length });
}
console.log(JSON.stringify({ bench: 'accessory-map', results: out }));
