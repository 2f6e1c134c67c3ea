import type { RoleName } from './roles';

/** The sections of the die page, each its own route under /dies/{number}. */
export const DIE_TABS: { path: string; label: string; roles?: RoleName[] }[] = [
	{ path: '', label: 'Overview' },
	{ path: '/shots', label: 'Shots & halves' },
	{ path: '/plan', label: 'Service plan' },
	{ path: '/jobs', label: 'Toolroom jobs' },
	{ path: '/surface', label: 'Surface' },
	{ path: '/cooling', label: 'Cooling' },
	{ path: '/bookings', label: 'Bookings' },
	{ path: '/sharing', label: 'Owner sharing', roles: ['admin', 'toolroom_lead'] }
];
