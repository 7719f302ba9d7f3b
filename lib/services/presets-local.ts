/**
 * Interim preset table with the measurement core's Preset interface, used until lib/geometry exports its
 * PRESETS (then lib/services/presets.ts reads those and this file goes). Bed frame, mm; the lattice is
 * centred on the bed with at least half a pitch of margin. Clearances: ISO 273 "medium" (M6 → 6.6 mm,
 * M8 → 9 mm, from memory); 20 mm dog holes on a 96 mm grid are common practice.
 */
import type { Family, Pattern } from '@/lib/geometry/contract';

export interface PresetSize {
  bedWidthMm: number;
  bedHeightMm: number;
  stripWidthMm?: number;
  pitchMm?: number;
  holeDiameterMm?: number;
  toleranceMm?: number;
}

export interface Preset {
  id: string;
  name: string;
  description: string;
  size(s: PresetSize): Pattern;
}

function grid(id: string, kind: Family['kind'], s: PresetSize, pitch: number, holeDiameter: number, fit: Family['fit']): Family {
  const along = (len: number) => {
    const count = Math.max(1, Math.floor((len - pitch) / pitch) + 1);
    return { count, origin: (len - (count - 1) * pitch) / 2 };
  };
  const x = along(s.bedWidthMm);
  const y = along(s.bedHeightMm);
  return { id, kind, holeDiameter, origin: { x: x.origin, y: y.origin }, pitch: { x: pitch, y: pitch }, count: { x: x.count, y: y.count }, fit };
}

function panels(s: PresetSize): Pattern['panels'] {
  const w = s.stripWidthMm;
  if (!w || w <= 0 || w >= s.bedHeightMm) return undefined;
  const n = Math.ceil(s.bedHeightMm / w - 1e-9);
  return Array.from({ length: n }, (_, i) => ({ id: `S${i + 1}`, x: 0, y: i * w, width: s.bedWidthMm, height: Math.min(w, s.bedHeightMm - i * w) }));
}

function mm(name: string, s: PresetSize, family: Family): Pattern {
  return { version: 1, name, units: 'mm', bed: { width: s.bedWidthMm, height: s.bedHeightMm }, families: [family], panels: panels(s) };
}

export const PRESETS: Preset[] = [
  {
    id: 'm6-50',
    name: 'M6 inserts on 50 mm',
    description: 'M6 threaded inserts on a 50 mm grid; ISO 273 medium clearance for the clamps.',
    size: (s) => mm('M6 inserts on 50 mm', s, grid('inserts', 'threaded-insert', s, 50, 6, { fastener: 'M6', clearance: 'medium' })),
  },
  {
    id: 'm8-100',
    name: 'M8 inserts on 100 mm',
    description: 'M8 threaded inserts on a 100 mm grid; ISO 273 medium clearance.',
    size: (s) => mm('M8 inserts on 100 mm', s, grid('inserts', 'threaded-insert', s, 100, 8, { fastener: 'M8', clearance: 'medium' })),
  },
  {
    id: 'g96-d20',
    name: '96 mm grid, 20 mm dog holes',
    description: '20 mm dog holes on a 96 mm grid.',
    size: (s) => mm('96 mm grid, 20 mm dog holes', s, grid('dogs', 'dog-hole', s, 96, 20, { pinDiameter: 19.9 })),
  },
  {
    id: 'custom',
    name: 'Custom grid',
    description: 'One family on a square grid of your pitch, hole size and tolerance.',
    size: (s) => mm('Custom grid', s, grid('holes', 'other', s, s.pitchMm ?? 50, s.holeDiameterMm ?? 6, { toleranceMm: s.toleranceMm ?? 0.2 })),
  },
];
