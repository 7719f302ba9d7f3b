import { publicBaseUrl } from '@/lib/http/origin';
import { json, route } from '@/lib/http/route';
import { inviteMember, InviteSchema, listMembers } from '@/lib/services/members';

/** GET /api/members → {members, invitations} (open invitations only for owners). */
export const GET = route({}, async ({ db, actor }) => listMembers(db, actor));

/** POST /api/members {email, role} → 201 {invitation, link}; the link is shown once, to copy. Owner only. */
export const POST = route({ permission: 'members:manage', body: InviteSchema }, async ({ db, actor, body, req }) =>
  json(await inviteMember(db, actor, body, publicBaseUrl(req)), 201),
);
