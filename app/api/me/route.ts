import { route } from '@/lib/http/route';

/** GET /api/me → {user, workshopId, role, workshops}: who is signed in and where they act. */
export const GET = route({ auth: 'user' }, async ({ auth }) => ({
  user: auth.user,
  workshopId: auth.actor?.workshopId ?? null,
  role: auth.actor?.role ?? null,
  workshops: auth.workshops,
}));
