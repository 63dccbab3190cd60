/** What a person does in a distillery; authorization (src/server/authz.ts) maps roles to actions. */

export const ROLES = ['manager', 'planner', 'distiller', 'staff'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = { manager: 'Manager', planner: 'Planner', distiller: 'Distiller', staff: 'Staff' };
