/**
 * Who is acting, and what their role lets them do. Every use case in lib/services takes the `Actor` first
 * and calls `authorize(actor, permission)` before it touches data; every read is scoped by
 * `actor.workshopId`, so another workshop's record is simply not found (404, never 403).
 *
 * Use:
 *   export async function createBed(db: Db, actor: Actor, input: NewBed) {
 *     authorize(actor, 'bed:write');          // throws AppError 403 `forbidden`
 *     ... queries with actor.workshopId ...
 *   }
 *
 * Roles (per workshop): owner — members, settings, deletion, plus all a machinist does; machinist — beds,
 * photos, checks, sharing; reviewer — reads and comments. Hiding a button is not a check: the server calls
 * `authorize` on every change.
 */
import { ROLES, type Role } from '@/db/schema';
import { forbidden } from '@/lib/http/errors';

export { ROLES, type Role };

export type ActorUser = { id: string; email: string; name: string; units: 'mm' | 'in' };

export type Actor = {
  user: ActorUser;
  /** The workshop this request acts in (chosen at sign-in, kept in the session cookie). */
  workshopId: string;
  /** The user's role in that workshop, read from the database on every request. */
  role: Role;
};

export const PERMISSIONS = [
  'workshop:read',
  'comment:write',
  'bed:write',
  'photo:upload',
  'check:run',
  'check:review',
  'share:manage',
  'accessory:write',
  'bed:delete',
  'check:delete',
  'members:manage',
  'workshop:settings',
  'workshop:delete',
] as const;
export type Permission = (typeof PERMISSIONS)[number];

const REVIEWER: readonly Permission[] = ['workshop:read', 'comment:write'];
const MACHINIST: readonly Permission[] = [...REVIEWER, 'bed:write', 'photo:upload', 'check:run', 'check:review', 'share:manage', 'accessory:write'];
const OWNER: readonly Permission[] = [...MACHINIST, 'bed:delete', 'check:delete', 'members:manage', 'workshop:settings', 'workshop:delete'];

/** What each role may do. */
export const ROLE_PERMISSIONS: Readonly<Record<Role, ReadonlySet<Permission>>> = {
  owner: new Set(OWNER),
  machinist: new Set(MACHINIST),
  reviewer: new Set(REVIEWER),
};

/** True when the actor's role grants `permission`. */
export function can(actor: Pick<Actor, 'role'>, permission: Permission): boolean {
  return ROLE_PERMISSIONS[actor.role].has(permission);
}

/** Throws AppError 403 `forbidden` unless the actor's role grants `permission`. */
export function authorize(actor: Pick<Actor, 'role'>, permission: Permission): void {
  if (!can(actor, permission)) throw forbidden();
}

/** Human words for a role, for pages. */
export const ROLE_LABELS: Record<Role, { name: string; does: string }> = {
  owner: { name: 'Owner', does: 'manages members and settings, deletes beds and checks, and does all a machinist does' },
  machinist: { name: 'Machinist', does: 'sets up beds, uploads photos, runs checks and shares reports' },
  reviewer: { name: 'Reviewer', does: 'reads beds and reports and leaves comments' },
};
