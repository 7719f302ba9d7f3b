/**
 * Pattern presets a bed can start from (`{ preset: ID }` in POST /api/beds). This is a small local lookup
 * until the measurement core exports its own PRESETS from lib/geometry; then `findPreset` reads from there.
 * Every preset is parsed with PatternSchema at load, so a bad one fails the tests, not a user.
 *
 * Values: metric threaded inserts with ISO 273 "medium" clearance for the bolt that goes in them (M6 → 6.6
 * mm, M8 → 9 mm hole; ISO 273, from memory); 20 mm dog holes on a 96 mm pitch are common practice for
 * bench and router fixture tops; 100 mm and 50 mm insert grids are common practice for router spoilboards.
 */
import { PatternSchema, type Pattern } from '@/lib/geometry/contract';

export type PresetEntry = { id: string; name: string; description: string; pattern: Pattern };

const RAW: { id: string; description: string; pattern: unknown }[] = [
  {
    id: 'inserts-m8-100',
    description: 'M8 threaded inserts on a 100 mm grid, full 1220 × 2440 mm sheet bed.',
    pattern: {
      version: 1,
      name: 'M8 inserts, 100 mm grid',
      units: 'mm',
      bed: { width: 1220, height: 2440 },
      families: [
        { id: 'insert', kind: 'threaded-insert', label: 'insert', holeDiameter: 8, origin: { x: 60, y: 70 }, pitch: { x: 100, y: 100 }, count: { x: 12, y: 24 }, fit: { fastener: 'M8', clearance: 'medium' } },
      ],
    },
  },
  {
    id: 'inserts-m6-50',
    description: 'M6 threaded inserts on a 50 mm grid, 600 × 900 mm bench-top router.',
    pattern: {
      version: 1,
      name: 'M6 inserts, 50 mm grid',
      units: 'mm',
      bed: { width: 600, height: 900 },
      families: [
        { id: 'insert', kind: 'threaded-insert', label: 'insert', holeDiameter: 6, origin: { x: 50, y: 50 }, pitch: { x: 50, y: 50 }, count: { x: 11, y: 17 }, fit: { fastener: 'M6', clearance: 'medium' } },
      ],
    },
  },
  {
    id: 'dogs-20-96',
    description: '20 mm dog holes on a 96 mm grid, 1000 × 600 mm fixture top.',
    pattern: {
      version: 1,
      name: '20 mm dog holes, 96 mm grid',
      units: 'mm',
      bed: { width: 1000, height: 600 },
      families: [
        { id: 'dog', kind: 'dog-hole', label: 'dog', holeDiameter: 20, origin: { x: 68, y: 60 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 6 }, fit: { toleranceMm: 0.3 } },
      ],
    },
  },
];

export const PRESET_LIST: readonly PresetEntry[] = RAW.map((r) => {
  const pattern = PatternSchema.parse(r.pattern);
  return { id: r.id, name: pattern.name, description: r.description, pattern };
});

export function findPreset(id: string): PresetEntry | undefined {
  return PRESET_LIST.find((p) => p.id === id);
}

export function listPresets(): readonly PresetEntry[] {
  return PRESET_LIST;
}
