import { route } from '@/lib/http/route';
import { summarisePattern } from '@/lib/services/beds';
import { listPresets } from '@/lib/services/presets';

/** GET /api/presets → {presets: [{id, name, description, summary, pattern}]}. */
export const GET = route({ auth: 'user' }, async () => ({
  presets: listPresets().map((p) => ({ id: p.id, name: p.name, description: p.description, summary: summarisePattern(p.pattern), pattern: p.pattern })),
}));
