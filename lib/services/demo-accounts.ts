/** The demo workshop's logins (see lib/services/demo.ts); shown on the sign-in page in demo mode only. */
import type { Role } from '@/db/schema';

export const DEMO_WORKSHOP_NAME = 'Cedar Row Workshop';
/** Never use these outside a demo. */
export const DEMO_PASSWORD = 'cedar-row-demo';
export const DEMO_LOGINS: { email: string; name: string; role: Role; who: string }[] = [
  { email: 'wren@cedarrow.example', name: 'Wren', role: 'owner', who: 'owner, keeps the router' },
  { email: 'juno@cedarrow.example', name: 'Juno', role: 'reviewer', who: 'finisher, reviews reports' },
];
