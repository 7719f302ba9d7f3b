/**
 * Pattern presets a bed can start from (`{ preset: ID, bedWidthMm?, bedHeightMm?, … }` in POST /api/beds).
 * The measurement core owns the presets (PRESETS in lib/geometry); this module is the one place the web app
 * reads them, adds a default bed size, and parses what they build with PatternSchema.
 */
import { z } from 'zod';
import { PatternSchema, type Pattern } from '@/lib/geometry/contract';
import { PRESETS, type Preset, type PresetSize } from '@/lib/geometry';

export type { Preset, PresetSize };

/** A full 4 × 8 ft sheet bed (1220 × 2440 mm) when no size is given — common practice for router tables. */
export const DEFAULT_PRESET_SIZE: PresetSize = { bedWidthMm: 1220, bedHeightMm: 2440 };

const dim = z.coerce.number().finite().positive().max(20_000);
/** A preset reference in a request, with the bed's size (mm). */
export const PresetRefSchema = z
  .object({
    preset: z.string().min(1).max(80),
    bedWidthMm: dim.optional(),
    bedHeightMm: dim.optional(),
    stripWidthMm: z.coerce.number().finite().min(0).max(20_000).optional(),
    pitchMm: dim.max(2000).optional(),
    holeDiameterMm: dim.max(200).optional(),
    toleranceMm: dim.max(50).optional(),
  })
  .strict();
export type PresetRef = z.infer<typeof PresetRefSchema>;

export function listPresets(): readonly Preset[] {
  return PRESETS;
}

export function findPreset(id: string): Preset | undefined {
  return listPresets().find((p) => p.id === id);
}

/** Builds the pattern of a preset for a bed size (default: a full sheet); undefined for an unknown id. */
export function buildPreset(ref: PresetRef): Pattern | undefined {
  const preset = findPreset(ref.preset);
  if (!preset) return undefined;
  const { preset: _id, ...size } = ref;
  return PatternSchema.parse(preset.size({ ...DEFAULT_PRESET_SIZE, ...Object.fromEntries(Object.entries(size).filter(([, v]) => v !== undefined)) }));
}
