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

/**
 * Told to the die's owner: the die passed 80 % or 95 % of its expected life (`threshold`), or its
 * reorder-by date has come (`threshold` null). Figures from loadReplacementOutlooks.
 */
export interface OwnerLifePayload extends DieFacts {
	kind: 'owner_life';
	threshold: 80 | 95 | null;
	lifeUsedPct: number;
	shotsRemaining: number;
	/** Plant dates `YYYY-MM-DD`, null without a projection. */
	projectedEndOfLife: string | null;
	reorderBy: string | null;
	leadDays: number;
}

/** Told to the die's owner: the toolroom lead holds the die waiting for the owner's decision. */
export interface OwnerDecisionPayload extends DieFacts {
	kind: 'owner_decision';
	decisionId: number;
	question: string;
	quotedHours: number | null;
	quotedCost: number | null;
	askedBy: string;
}

/** Told to the toolroom leads: the owner answered a question. */
export interface OwnerAnswerPayload extends DieFacts {
	kind: 'owner_answer';
	decisionId: number;
	question: string;
	/** The answer in words (OWNER_ANSWER_LABELS). */
	answer: string;
	answerText: string | null;
	answeredBy: string;
}

export type NoticePayload =
	| ServicePayload
	| LifePayload
	| JobCompletedPayload
	| DieStatePayload
	| OwnerLifePayload
	| OwnerDecisionPayload
	| OwnerAnswerPayload;

/** Kinds that go to a die's owner (their own e-mail, links into the owner portal). */
export const OWNER_NOTICE_KINDS = [
	'owner_life',
	'owner_decision'
] as const satisfies readonly NoticeKind[];

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
	'decision_asked',
	'owner_answered',
	'not_bookable',
	'overdue',
	'due',
	'coming_up',
	'life_100',
	'life_90',
	'ready_again',
	'reorder_due',
	'life_95',
	'life_80'
];

export const NOTICE_LEVEL_LABELS: Record<NoticeLevel, string> = {
	overdue: 'Service overdue',
	due: 'Service due',
	coming_up: 'Service coming up',
	life_100: 'Expected life reached',
	life_90: 'Past 90 % of expected life',
	ready_again: 'Ready again after the toolroom',
	not_bookable: 'Cannot be booked now',
	life_80: 'Past 80 % of expected life',
	life_95: 'Past 95 % of expected life',
	reorder_due: 'Time to order the replacement',
	decision_asked: 'Your decision is asked',
	owner_answered: 'The owner answered'
};

/** Short counts for a digest subject, e.g. "2 overdue". */
export const NOTICE_LEVEL_COUNT_WORDS: Record<NoticeLevel, string> = {
	overdue: 'overdue',
	due: 'due',
	coming_up: 'coming up',
	life_100: 'at end of life',
	life_90: 'past 90 % life',
	ready_again: 'ready again',
	not_bookable: 'not bookable',
	life_80: 'past 80 % life',
	life_95: 'past 95 % life',
	reorder_due: 'to reorder',
	decision_asked: 'decision asked',
	owner_answered: 'owner answered'
};
