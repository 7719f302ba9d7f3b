/**
 * Pattern presets, sized to a user's bed and strips. Bed frame, mm (imperial presets are built in inches and
 * keep `units: "in"`; patternToMm converts them). A preset centres its lattice on the bed with at least half a
 * pitch of margin, and cuts the bed into strips (panels) running along X when a strip width is given.
 */
import { MM_PER_IN, PatternSchema, type Family, type Pattern } from './contract';

export interface PresetSize {
  /** Bed width along X and height along Y, mm. */
  bedWidthMm: number;
  bedHeightMm: number;
  /** Width (along Y) of each strip or panel, mm; omitted or 0 for one piece. */
  stripWidthMm?: number;
  /** For the custom preset: pitch and hole diameter, mm, and the radial tolerance. */
  pitchMm?: number;
  holeDiameterMm?: number;
  toleranceMm?: number;
}

export interface Preset {
  id: string;
  name: string;
  description: string;
  /** Builds the pattern for a bed of the given size. */
  size(s: PresetSize): Pattern;
}

/** Count of lattice positions along a length with margin ≥ half a pitch on each side, and the first one. */
function spread(lengthU: number, pitchU: number, offsetU = 0): { count: number; origin: number } {
  const count = Math.max(1, Math.floor((lengthU - pitchU - 2 * offsetU) / pitchU) + 1);
  return { count, origin: (lengthU - (count - 1) * pitchU) / 2 };
}

function strips(widthU: number, heightU: number, stripU: number | undefined): Pattern['panels'] {
  if (!stripU || stripU <= 0 || stripU >= heightU) return undefined;
  const n = Math.ceil(heightU / stripU - 1e-9);
  return Array.from({ length: n }, (_, i) => ({ id: `S${i + 1}`, x: 0, y: i * stripU, width: widthU, height: Math.min(stripU, heightU - i * stripU) }));
}

function grid(id: string, kind: Family['kind'], w: number, h: number, pitch: number, holeDiameter: number, fit: Family['fit'], offset = 0): Family {
  const sx = spread(w, pitch, offset), sy = spread(h, pitch, offset);
  return { id, kind, holeDiameter, origin: { x: sx.origin, y: sy.origin }, pitch: { x: pitch, y: pitch }, count: { x: sx.count, y: sy.count }, fit };
}

/** A preset of one family in mm: `family` lays it out on a bed of `s`, cut into strips of `s.stripWidthMm` when given. */
function oneFamilyPreset(id: string, name: string, description: string, family: (s: PresetSize) => Family): Preset {
  return {
    id, name, description,
    size: (s) => PatternSchema.parse({ version: 1, name, units: 'mm', bed: { width: s.bedWidthMm, height: s.bedHeightMm }, families: [family(s)], panels: strips(s.bedWidthMm, s.bedHeightMm, s.stripWidthMm) }),
  };
}

export const PRESETS: Preset[] = [
  {
    id: 'in-3-quarter20-dogs',
    name: '1/4-20 inserts on 3 in, 3/4 in dog holes between',
    description: '1/4-20 threaded inserts on a 3 in grid; 3/4 in dog holes on a 6 in grid at the centres between inserts.',
    size(s) {
      const w = s.bedWidthMm / MM_PER_IN, h = s.bedHeightMm / MM_PER_IN;
      const inserts = grid('inserts', 'threaded-insert', w, h, 3, 0.25, { fastener: '1/4-20', clearance: 'normal' });
      // Dogs sit at cell centres between inserts, every other cell: first at insert origin + 1.5 in.
      const dogs: Family = {
        id: 'dogs', kind: 'dog-hole', holeDiameter: 0.77,
        origin: { x: inserts.origin.x + 1.5, y: inserts.origin.y + 1.5 }, pitch: { x: 6, y: 6 },
        count: { x: Math.max(1, Math.floor((inserts.count.x - 1) / 2)), y: Math.max(1, Math.floor((inserts.count.y - 1) / 2)) },
        // A 0.750 in dog in a 0.770 in hole: 0.010 in radial (common practice).
        fit: { pinDiameter: 0.75 },
      };
      return PatternSchema.parse({ version: 1, name: this.name, units: 'in', bed: { width: w, height: h }, families: [inserts, dogs], panels: strips(w, h, s.stripWidthMm ? s.stripWidthMm / MM_PER_IN : undefined) });
    },
  },
  oneFamilyPreset(
    'm6-50', 'M6 inserts on 50 mm',
    'M6 threaded inserts on a 50 mm grid; ISO 273 medium clearance for the clamps.',
    (s) => grid('inserts', 'threaded-insert', s.bedWidthMm, s.bedHeightMm, 50, 6, { fastener: 'M6', clearance: 'medium' }),
  ),
  oneFamilyPreset(
    'g96-d20', '96 mm grid, 20 mm dog holes',
    '20 mm dog holes on a 96 mm grid; 20 mm dogs with 0.05 mm radial play (common practice for a snug dog).',
    (s) => grid('dogs', 'dog-hole', s.bedWidthMm, s.bedHeightMm, 96, 20, { pinDiameter: 19.9 }),
  ),
  oneFamilyPreset(
    'm8-100', 'M8 inserts on 100 mm',
    'M8 threaded inserts on a 100 mm grid; ISO 273 medium clearance.',
    (s) => grid('inserts', 'threaded-insert', s.bedWidthMm, s.bedHeightMm, 100, 8, { fastener: 'M8', clearance: 'medium' }),
  ),
  oneFamilyPreset(
    'custom', 'Custom grid',
    'One family on a square grid of your pitch, hole size and tolerance; edit the JSON for more.',
    (s) => grid('holes', 'other', s.bedWidthMm, s.bedHeightMm, s.pitchMm ?? 50, s.holeDiameterMm ?? 6, { toleranceMm: s.toleranceMm ?? 0.2 }),
  ),
];

/** The preset with this id, or undefined. */
export const presetById = (id: string): Preset | undefined => PRESETS.find((p) => p.id === id);
