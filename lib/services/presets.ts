/**
 * Pattern presets a bed can start from (`{ preset: ID, bedWidthMm?, bedHeightMm?, … }` in POST /api/beds).
 * The measurement core owns the presets (PRESETS in lib/geometry); this module is the one place the web app
 * reads them, adds a default bed size, and parses what they build with PatternSchema.
 */
import { z } from 'zod';
import { BED_SIDE_MM, HOLE_DIAMETER_MM, MAX_PANELS, MAX_POSITIONS, PatternSchema, PITCH_MM, TOLERANCE_MM, type Pattern } from '@/lib/geometry/contract';
import { decimalIn } from '@/lib/http/decimal';
import { PRESETS, type Preset, type PresetSize } from '@/lib/geometry';

export type { Preset, PresetSize };

/** A full 4 × 8 ft sheet bed (1220 × 2440 mm) when no size is given — common practice for router tables. */
export const DEFAULT_PRESET_SIZE: PresetSize = { bedWidthMm: 1220, bedHeightMm: 2440 };

/**
 * A preset reference in a request, with the bed's size (mm). Ranges are the pattern contract's physical bounds
 * (BED_SIDE_MM, PITCH_MM, HOLE_DIAMETER_MM, TOLERANCE_MM; common practice); a strip is 20 mm (a T-track's
 * width) or wider, and a bed is cut into at most MAX_PANELS strips and MAX_POSITIONS positions, checked here
 * so the message names the field sent.
 */
export const PresetRefSchema = z
  .object({
    preset: z.string().min(1).max(80),
    bedWidthMm: decimalIn('bedWidthMm', BED_SIDE_MM.min, BED_SIDE_MM.max, 'mm').optional(),
    bedHeightMm: decimalIn('bedHeightMm', BED_SIDE_MM.min, BED_SIDE_MM.max, 'mm').optional(),
    stripWidthMm: decimalIn('stripWidthMm', 0, BED_SIDE_MM.max, 'mm').optional(),
    pitchMm: decimalIn('pitchMm', PITCH_MM.min, PITCH_MM.max, 'mm').optional(),
    holeDiameterMm: decimalIn('holeDiameterMm', HOLE_DIAMETER_MM.min, HOLE_DIAMETER_MM.max, 'mm').optional(),
    toleranceMm: decimalIn('toleranceMm', TOLERANCE_MM.min, TOLERANCE_MM.max, 'mm').optional(),
  })
  .strict()
  .superRefine((r, ctx) => {
    const w = r.bedWidthMm ?? DEFAULT_PRESET_SIZE.bedWidthMm, h = r.bedHeightMm ?? DEFAULT_PRESET_SIZE.bedHeightMm;
    const strip = r.stripWidthMm ?? 0;
    if (strip > 0 && strip < 20) ctx.addIssue({ code: 'custom', path: ['stripWidthMm'], message: 'stripWidthMm must be 0 (one piece) or at least 20 mm' });
    else if (strip > 0 && Math.ceil(h / strip - 1e-9) > MAX_PANELS) {
      ctx.addIssue({ code: 'custom', path: ['stripWidthMm'], message: `stripWidthMm ${strip} cuts the ${h} mm bed into more than ${MAX_PANELS} strips; use at least ${Math.ceil(h / MAX_PANELS)} mm` });
    }
    if (r.pitchMm !== undefined) {
      const n = Math.floor(w / r.pitchMm) * Math.floor(h / r.pitchMm);
      if (n > MAX_POSITIONS) ctx.addIssue({ code: 'custom', path: ['pitchMm'], message: `pitchMm ${r.pitchMm} gives about ${n} positions on a ${w} × ${h} mm bed; at most ${MAX_POSITIONS}: use a pitch of at least ${Math.ceil(Math.sqrt((w * h) / MAX_POSITIONS))} mm` });
    }
  });
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
