import { route } from '@/lib/http/route';
import { summarisePattern } from '@/lib/services/beds';
import { DEFAULT_PRESET_SIZE, listPresets } from '@/lib/services/presets';

/** GET /api/presets → {presets: [{id, name, description, example}]}; `example` is the pattern on a full sheet bed. */
export const GET = route({ auth: 'user' }, async () => ({
  defaultSize: DEFAULT_PRESET_SIZE,
  presets: listPresets().map((p) => ({ id: p.id, name: p.name, description: p.description, example: summarisePattern(p.size(DEFAULT_PRESET_SIZE)) })),
}));
