// Castellan's words for states and kinds, in one place for every screen, export and e-mail.
import type { AlloyFamily, DieProcess, DieStatus } from './domain';

export const DIE_STATUSES: DieStatus[] = ['ready', 'running', 'in_toolroom', 'held', 'retired'];
export const DIE_STATUS_LABELS: Record<DieStatus, string> = {
	ready: 'Ready',
	running: 'Running',
	in_toolroom: 'In toolroom',
	held: 'Held',
	retired: 'Retired'
};
/** Plain words for the owner portal. */
export const DIE_STATUS_FOR_OWNERS: Record<DieStatus, string> = {
	ready: 'Ready for production',
	running: 'In production',
	in_toolroom: 'Being serviced or repaired',
	held: 'On hold pending a decision',
	retired: 'Retired from service'
};

export const SERVICE_STATE_LABELS = {
	on_track: 'On track',
	coming_up: 'Coming up',
	due: 'Due',
	overdue: 'Overdue'
} as const;
export type ServiceStateName = keyof typeof SERVICE_STATE_LABELS;

export const SERVICE_KIND_LABELS: Record<string, string> = {
	stress_relief: 'Stress relief',
	surface_inspection: 'Surface inspection',
	cooling_flush: 'Cooling-line flush',
	teardown: 'Teardown and overhaul'
};
export const serviceKindLabel = (kind: string) => SERVICE_KIND_LABELS[kind] ?? kind;

export const ALLOY_FAMILIES: AlloyFamily[] = ['zinc', 'magnesium', 'aluminium', 'copper'];
export const ALLOY_FAMILY_LABELS: Record<AlloyFamily, string> = {
	zinc: 'Zinc',
	magnesium: 'Magnesium',
	aluminium: 'Aluminium',
	copper: 'Copper alloy (brass)'
};

export const PROCESS_LABELS: Record<DieProcess, string> = {
	hot_chamber: 'Hot chamber',
	cold_chamber: 'Cold chamber'
};

export const HALF_LABELS = { cover: 'Cover half', ejector: 'Ejector half' } as const;

// Toolroom: jobs, surface inspections, cooling.
export const JOB_STATUS_LABELS = {
	open: 'Open',
	in_progress: 'In progress',
	waiting_parts: 'Waiting for parts',
	done: 'Done',
	cancelled: 'Cancelled'
} as const;
export type JobStatusName = keyof typeof JOB_STATUS_LABELS;
export const JOB_KIND_LABELS: Record<string, string> = {
	repair: 'Repair',
	modification: 'Modification',
	...SERVICE_KIND_LABELS
};
export const jobKindLabel = (kind: string) => JOB_KIND_LABELS[kind] ?? kind;
export const JOB_HALF_LABELS = {
	cover: 'Cover half',
	ejector: 'Ejector half',
	both: 'Both halves'
} as const;
export const COOLANT_LABELS = { water: 'Water', oil: 'Oil' } as const;
export const LEAK_TEST_LABELS = { pass: 'Pass — no leak', fail: 'Fail — leaks' } as const;
export const FLOW_REGIME_LABELS = {
	laminar: 'Laminar',
	transitional: 'Transitional',
	turbulent: 'Turbulent'
} as const;
export const HEAT_BALANCE_LABELS = {
	cooling_short: 'Cooling short',
	balanced: 'Balanced',
	ample: 'Cooling to spare'
} as const;
/** What an imported row does, as a word and a mark (die-register import preview). */
export const IMPORT_ROW_LABELS = {
	create: { word: 'New', mark: '+' },
	update: { word: 'Changes', mark: '~' },
	unchanged: { word: 'No change', mark: '=' },
	skip: { word: 'Skipped', mark: '–' },
	problem: { word: 'Needs a fix', mark: '✗' }
} as const;
