// Shared by client and server: role names, their plain labels and where each lands after sign-in.
export const ROLES = ['admin', 'toolroom_lead', 'toolmaker', 'scheduler', 'customer'] as const;
export type RoleName = (typeof ROLES)[number];

export const ROLE_LABELS: Record<RoleName, string> = {
	admin: 'Plant admin',
	toolroom_lead: 'Toolroom lead',
	toolmaker: 'Toolmaker',
	scheduler: 'Production planner',
	customer: 'Tooling owner'
};

export const ROLE_HOME: Record<RoleName, string> = {
	admin: '/plant',
	toolroom_lead: '/toolroom',
	toolmaker: '/toolroom',
	scheduler: '/planner',
	customer: '/owner'
};

/** Roles that work inside the plant (everyone but the tooling owner). */
export const PLANT_ROLES: RoleName[] = ['admin', 'toolroom_lead', 'toolmaker', 'scheduler'];
/** Roles that may create and edit dies, halves and service plans. */
export const DIE_EDITORS: RoleName[] = ['admin', 'toolroom_lead'];
/** Roles that may record shots. */
export const SHOT_RECORDERS: RoleName[] = ['admin', 'toolroom_lead', 'scheduler'];

/** Roles that may edit presses and press bookings. */
export const BOOKING_EDITORS: RoleName[] = ['admin', 'scheduler'];

export const API_SCOPES = ['shots:write', 'dies:read', 'bookings:write'] as const;
export type ApiScope = (typeof API_SCOPES)[number];
