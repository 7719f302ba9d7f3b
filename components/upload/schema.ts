/**
 * The upload form's fields, checked with zod before anything is sent: the bed, the reference square's
 * measured side in mm or inches (sent as `referenceMm`), an optional title, and the photo. Pure; the page
 * and the tests share it.
 */
import { z } from 'zod';
import { MM_PER_IN } from '@/lib/geometry/contract';

/** The reference squares Gridproof prints (lib/pdf/target.ts), for one-tap choices: side in mm. */
export const REFERENCE_CHOICES = [
  { label: '100 mm', mm: 100, units: 'mm' as const, value: 100 },
  { label: '150 mm', mm: 150, units: 'mm' as const, value: 150 },
  { label: '4 in', mm: 4 * MM_PER_IN, units: 'in' as const, value: 4 },
  { label: '250 mm', mm: 250, units: 'mm' as const, value: 250 },
];

/** Smallest and largest reference square the analysis takes, mm (the API refuses above 2000 mm). */
export const REFERENCE_MIN_MM = 10;
export const REFERENCE_MAX_MM = 2000;

export const UploadFormSchema = z
  .object({
    bedId: z.string().min(1, 'Choose the bed in the photo.'),
    size: z.coerce.number({ error: 'Give the square\'s measured side as a number.' }).finite('Give the square\'s measured side as a number.').positive('The side must be more than 0.'),
    units: z.enum(['mm', 'in']),
    title: z.string().trim().max(120, 'Keep the title under 120 characters.').optional(),
  })
  .transform((v) => ({ ...v, referenceMm: v.units === 'in' ? v.size * MM_PER_IN : v.size }))
  .superRefine((v, ctx) => {
    if (v.referenceMm < REFERENCE_MIN_MM || v.referenceMm > REFERENCE_MAX_MM) {
      const range = v.units === 'in' ? `${+(REFERENCE_MIN_MM / MM_PER_IN).toFixed(2)}–${+(REFERENCE_MAX_MM / MM_PER_IN).toFixed(1)} in` : `${REFERENCE_MIN_MM}–${REFERENCE_MAX_MM} mm`;
      ctx.addIssue({ code: 'custom', path: ['size'], message: `A reference square's side is between ${range}; measure the printed square with a rule.` });
    }
  });
export type UploadForm = z.output<typeof UploadFormSchema>;

/** Checks the chosen photo before sending: present, an image, not larger than the server takes. */
export function photoProblem(file: { size: number; type: string } | null, maxBytes: number): string | null {
  if (!file) return 'Choose or take a photo of the bed.';
  if (file.size === 0) return 'That file is empty.';
  if (file.type && !file.type.startsWith('image/')) return 'That file is not a photo.';
  if (file.size > maxBytes) return `The photo is ${(file.size / 1048576).toFixed(1)} MB; the limit is ${(maxBytes / 1048576).toFixed(1)} MB. Take it at a lower resolution or export a smaller copy.`;
  return null;
}
