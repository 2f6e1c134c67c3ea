/**
 * The tooling statement of one customer: every die it owns with shots, life used, projected
 * replacement date and a service history summary made only of what the plant shared. The data
 * is assembled here; statement-pdf.ts lays it out.
 */
import type { DB } from '../db/connect';
import { plantDate } from '../../plant-time';
import { nowIso } from '../time';
import {
	findOwnerCustomer,
	loadOwnerDies,
	sharedSummary,
	summariseOwnerDies,
	type OwnerDieRow,
	type OwnerTotals
} from './portfolio';

/** Shared summaries listed per die on the statement; older ones are only counted. */
export const STATEMENT_SUMMARIES_PER_DIE = 3;

export interface StatementService {
	/** Finished toolroom jobs on the die. */
	jobsDone: number;
	/** Of those, how many the plant marked billable to the owner. */
	billable: number;
	lastDoneAt: string | null;
	/** Newest first, shared summaries only. */
	summaries: { date: string; kind: string; text: string; billable: boolean }[];
}

export interface StatementDie extends OwnerDieRow {
	service: StatementService;
}

export interface OwnerStatement {
	customer: { code: string; name: string };
	asOf: string;
	dies: StatementDie[];
	totals: OwnerTotals;
}

/** The statement of one customer, or undefined when there is no such customer. */
export async function getOwnerStatement(
	db: DB,
	customerId: number,
	asOf = nowIso()
): Promise<OwnerStatement | undefined> {
	const customer = await findOwnerCustomer(db, customerId);
	if (!customer) return undefined;
	const [dies, jobs] = await Promise.all([
		loadOwnerDies(db, customerId, asOf),
		db
			.selectFrom('toolroom_jobs as j')
			.innerJoin('dies', 'dies.id', 'j.die_id')
			.select([
				'j.die_id as dieId',
				'j.kind',
				'j.closed_at',
				'j.billable_to_owner',
				'j.owner_summary',
				'j.summary_shared'
			])
			.where('dies.customer_id', '=', customerId)
			.where('j.status', '=', 'done')
			.where('j.voided_at', 'is', null)
			.orderBy('j.closed_at', 'desc')
			.orderBy('j.id', 'desc')
			.execute()
	]);
	const services = new Map<number, StatementService>();
	for (const j of jobs) {
		const s = services.get(j.dieId) ?? {
			jobsDone: 0,
			billable: 0,
			lastDoneAt: null,
			summaries: []
		};
		s.jobsDone++;
		if (j.billable_to_owner === 1) s.billable++;
		s.lastDoneAt ??= j.closed_at;
		const text = sharedSummary(j);
		if (text && s.summaries.length < STATEMENT_SUMMARIES_PER_DIE) {
			s.summaries.push({
				date: j.closed_at ? plantDate(j.closed_at) : '',
				kind: j.kind,
				text,
				billable: j.billable_to_owner === 1
			});
		}
		services.set(j.dieId, s);
	}
	return {
		customer: { code: customer.code, name: customer.name },
		asOf,
		dies: dies.map((d) => ({
			...d,
			service: services.get(d.id) ?? { jobsDone: 0, billable: 0, lastDoneAt: null, summaries: [] }
		})),
		totals: summariseOwnerDies(dies)
	};
}
