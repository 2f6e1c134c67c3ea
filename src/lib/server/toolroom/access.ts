import { PLANT_ROLES, type RoleName } from '../../roles';

/** Everyone inside the plant may read toolroom records (the planner read-only). */
export const TOOLROOM_READERS: RoleName[] = PLANT_ROLES;
/** Log repairs, inspections, cooling checks and photos; move jobs on and close them. */
export const TOOLROOM_WORKERS: RoleName[] = ['admin', 'toolroom_lead', 'toolmaker'];
/** Cancel jobs, keep a die out of the toolroom while a job is open, define cooling circuits. */
export const TOOLROOM_LEADS: RoleName[] = ['admin', 'toolroom_lead'];

export const canWorkToolroom = (role: RoleName) => TOOLROOM_WORKERS.includes(role);
export const canLeadToolroom = (role: RoleName) => TOOLROOM_LEADS.includes(role);
