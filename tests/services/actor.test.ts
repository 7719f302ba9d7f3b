import { describe, expect, it } from 'vitest';
import { authorize, can, PERMISSIONS, ROLES } from '@/lib/services/actor';
import { AppError } from '@/lib/http/errors';

// The role split is the product's rule (issue 2): owner — members, settings, deletion and all a machinist
// does; machinist — beds, photos, checks, sharing; reviewer — reads and comments.
describe('roles', () => {
  it('lets a reviewer only read and comment', () => {
    const allowed = PERMISSIONS.filter((p) => can({ role: 'reviewer' }, p));
    expect(allowed.sort()).toEqual(['comment:write', 'workshop:read']);
  });

  it('lets a machinist work on beds, photos, checks and sharing but not manage members or delete', () => {
    for (const p of ['bed:write', 'photo:upload', 'check:run', 'share:manage'] as const) expect(can({ role: 'machinist' }, p)).toBe(true);
    for (const p of ['members:manage', 'workshop:settings', 'bed:delete', 'check:delete', 'workshop:delete'] as const) expect(can({ role: 'machinist' }, p)).toBe(false);
  });

  it('gives an owner every permission', () => {
    for (const p of PERMISSIONS) expect(can({ role: 'owner' }, p)).toBe(true);
  });

  it('gives each role a superset of the permissions of the role below it', () => {
    const set = (r: (typeof ROLES)[number]) => new Set(PERMISSIONS.filter((p) => can({ role: r }, p)));
    for (const p of set('reviewer')) expect(set('machinist').has(p)).toBe(true);
    for (const p of set('machinist')) expect(set('owner').has(p)).toBe(true);
  });

  it('throws a 403 forbidden AppError when the role lacks the permission', () => {
    try {
      authorize({ role: 'reviewer' }, 'bed:write');
      expect.unreachable();
    } catch (err) {
      expect(err).toBeInstanceOf(AppError);
      expect((err as AppError).status).toBe(403);
      expect((err as AppError).code).toBe('forbidden');
    }
  });
});
