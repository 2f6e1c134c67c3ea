import type { NoticeKind, NoticeLevel } from '../db/schema-notices';

export type { DeliveryState, NoticeKind, NoticeLevel } from '../db/schema-notices';

/** What every notice says about its die. */
interface DieFacts {
	dieNumber: string;
	partName: string;
	customerName: string;
}

export interface ServicePayload extends DieFacts {
	kind: 'service';
	taskId: number;
	taskKind: string;
	state: 'coming_up' | 'due' | 'overdue';
	/** Share of the interval used, 1 = 100 %. */
	fraction: number;
	intervalShots: number | null;
	intervalDays: number | null;
	shotsRemaining: number | null;
	daysRemaining: number | null;
	lastDoneAt: string;
}

export interface LifePayload extends DieFacts {
	kind: 'life';
	/** The threshold passed, percent: 90 or 100. */
	threshold: number;
	lifeUsedPct: number;
	totalShots: number;
	expectedLifeShots: number;
}

export interface JobCompletedPayload extends DieFacts {
	kind: 'job_completed';
	jobNumber: string;
	summary: string;
}

/** A die moved by hand to another state, told to the planners with its press bookings. */
export interface DieStatePayload extends DieFacts {
	kind: 'die_state';
	from: string;
	to: string;
	reason: string;
	/** What the move does to the die's coming press bookings, in words (from describeStateChange). */
	consequence: string;
}

export type NoticePayload = ServicePayload | LifePayload | JobCompletedPayload | DieStatePayload;

/** One thing to tell someone, before it is written to the outbox. */
export interface NoticeItem {
	/** Unique per (die, task, cycle, state): a second run finds the same key and writes nothing. */
	key: string;
	kind: NoticeKind;
	level: NoticeLevel;
	dieId: number;
	subject: string;
	payload: NoticePayload;
}

export interface NoticeRecipient {
	email: string;
	name: string;
	userId: string | null;
}

/** Digest groups, worst first. */
export const NOTICE_LEVELS: readonly NoticeLevel[] = [
	'not_bookable',
	'overdue',
	'due',
	'coming_up',
	'life_100',
	'life_90',
	'ready_again'
];

export const NOTICE_LEVEL_LABELS: Record<NoticeLevel, string> = {
	overdue: 'Service overdue',
	due: 'Service due',
	coming_up: 'Service coming up',
	life_100: 'Expected life reached',
	life_90: 'Past 90 % of expected life',
	ready_again: 'Ready again after the toolroom',
	not_bookable: 'Cannot be booked now'
};

/** Short counts for a digest subject, e.g. "2 overdue". */
export const NOTICE_LEVEL_COUNT_WORDS: Record<NoticeLevel, string> = {
	overdue: 'overdue',
	due: 'due',
	coming_up: 'coming up',
	life_100: 'at end of life',
	life_90: 'past 90 % life',
	ready_again: 'ready again',
	not_bookable: 'not bookable'
};
