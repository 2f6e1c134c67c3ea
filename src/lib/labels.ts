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

/** States of a ledger entry besides "counted": waiting for review, confirmed, voided. */
export const ENTRY_STATE_LABELS = {
	to_review: 'To review',
	confirmed: 'Confirmed',
	voided: 'Voided'
} as const;
/** What the toolroom lead can do to a ledger entry. */
export const ENTRY_ACTION_LABELS = {
	confirm: 'Confirm as counted',
	correct: 'Correct the figures',
	void: 'Void (counts nothing)'
} as const;
/** Audit actions of a die's history in words (src/lib/history.ts words the whole entry). */
export const AUDIT_ACTION_LABELS: Record<string, string> = {
	'die.create': 'Die registered',
	'die.edit': 'Register data edited',
	'die.status': 'State changed',
	'half.replace': 'Half replaced',
	'shots.correction': 'Shot correction',
	'service.done': 'Service done',
	'service.intervals': 'Service interval changed',
	'service.add': 'Service task added',
	'service.deactivate': 'Service task taken off the plan',
	'job.open': 'Toolroom job opened',
	'job.status': 'Toolroom job moved',
	'job.assign': 'Toolroom job assigned',
	'job.close': 'Toolroom job closed',
	'job.cancel': 'Toolroom job cancelled',
	'job.void': 'Toolroom job voided',
	'job.work': 'Hours recorded on a toolroom job',
	'job.part': 'Part recorded on a toolroom job',
	'job.work.void': 'Hours entry of a toolroom job voided',
	'job.part.void': 'Part entry of a toolroom job voided',
	'job.owner_summary': 'Owner summary changed',
	'surface.inspect': 'Surface inspection',
	'surface.void': 'Surface inspection voided',
	'surface.correct': 'Surface inspection corrected',
	'cooling.circuit': 'Cooling circuit added',
	'cooling.check': 'Cooling check',
	'cooling.void': 'Cooling check voided',
	'cooling.correct': 'Cooling check corrected',
	'booking.create': 'Press booking made',
	'booking.cancel': 'Press booking cancelled',
	'booking.edit': 'Press booking changed',
	'photo.add': 'Photos added',
	'photo.share': 'Photo sharing changed',
	'zone.add': 'Surface zone listed',
	'job.repairs': 'Repairs recorded on a job',
	'shots.void': 'Shot entry voided',
	'shots.correct': 'Shot entry corrected',
	'shots.confirm': 'Shot entry confirmed',
	'shots.reset': 'Counter reset',
	'die.import_update': 'Changed by a register import',
	'window.reserve': 'Service window set aside for the toolroom',
	'window.cancel': 'Service window called off',
	'window.start': 'Toolroom job opened from a service window',
	'owner.decision_asked': "Owner's decision asked",
	'owner.decision_answered': 'Owner answered',
	'photo.caption': 'Photo caption changed'
};
/** Where a run's planned rate came from (planRate in lib/server/schedule/die-facts.ts). */
export const RATE_SOURCE_LABELS = {
	order: 'as planned for this order',
	die: 'the die’s own rate',
	press: 'the press’s usual rate',
	alloy: 'middle of the alloy’s usual range (NADCA)'
} as const;
/** Shown where a booking's start is set: the die change and preheat are hot, heavy work. */
export const CHANGEOVER_CAUTION =
	'Die change and preheat are hot, heavy work: dies and platens stay hot for hours and hydraulics hold stored energy. The press is locked out while the die is changed, and the plant’s procedures and local codes decide.';
// Verdicts of the order check and the booking form (one judge: lib/server/schedule/verdict.ts).
export const VERDICT_LABELS = {
	fits: 'Fits',
	warning: 'Fits with warnings',
	blocked: 'Blocked'
} as const;
/** The mark that goes with each verdict word (never colour alone): order check, booking, board. */
export const VERDICT_MARKS = { fits: '✓', warning: '!', blocked: '✕' } as const;
// Why a die was retired; only worn out and cracked beyond repair are wear failures in the fleet fit.
export const RETIREMENT_REASON_LABELS = {
	worn_out: 'Worn out',
	cracked: 'Cracked beyond repair',
	damaged: 'Damaged (accident)',
	obsolete: 'Part obsolete',
	transferred: 'Transferred to another plant',
	recalled: 'Customer recalled the tool'
} as const;
export const REPAIR_KIND_LABELS = {
	weld: 'Weld repair',
	insert_change: 'Insert changed',
	remachining: 'Re-machined'
} as const;
/** Shown wherever a clamping figure is: figures plan, the press maker's rating decides. */
export const CLAMP_CAUTION =
	'Caution: an under-sized clamp lets the die open and molten metal spray from the parting line. The press maker’s rating and the plant’s procedures decide; this figure is a planning aid.';
/** What a job photo shows; the shape goes with the word wherever a stage is shown. */
export const PHOTO_STAGE_LABELS = {
	before: { word: 'Before', shape: '◁' },
	during: { word: 'During', shape: '◇' },
	after: { word: 'After', shape: '▷' }
} as const;
/** What an imported row does, as a word and a mark (die-register import preview). */
export const IMPORT_ROW_LABELS = {
	create: { word: 'New', mark: '+' },
	update: { word: 'Changes', mark: '~' },
	unchanged: { word: 'No change', mark: '=' },
	skip: { word: 'Skipped', mark: '–' },
	problem: { word: 'Needs a fix', mark: '✗' }
} as const;
/**
 * The short word a narrow board bar falls back to; the full word is VERDICT_LABELS and the mark
 * VERDICT_MARKS. Bars add a fill pattern, so none reads by colour alone.
 */
export const VERDICT_SHORT = { fits: 'OK', warning: 'Risk', blocked: 'Blocked' } as const;
/** Where a service window stands. */
export const SERVICE_WINDOW_LABELS = {
	reserved: { word: 'Reserved', mark: '◫' },
	started: { word: 'Job opened', mark: '▶' },
	problem: { word: 'Not started', mark: '✕' }
} as const;
/** Why a die is held, as the toolroom lead picks it; only the owner's decision asks anything. */
export const HOLD_REASON_LABELS = {
	owner_decision: "Waiting for the owner's decision",
	other: 'Other reason (say which)'
} as const;
/** What a die's owner may answer when asked for a decision; the shape goes with the word. */
export const OWNER_ANSWER_LABELS = {
	approve_repair: { word: 'Approve the repair', shape: '✓' },
	order_replacement: { word: 'Order a replacement die', shape: '↻' },
	retire: { word: 'Retire the die', shape: '■' },
	write_back: { word: 'Written reply', shape: '✎' }
} as const;
/** Said on every decision card: the answer is a message to the plant, not a state change. */
export const OWNER_ANSWER_EFFECT =
	"The answer does not change the die's state by itself: the toolroom lead acts on it.";
