/**
 * The statement of one tooling owner for a period (a month, a quarter, a year or custom plant
 * dates): per die the opening shots, the shots in the period and the closing shots from the
 * shot ledger, the life outlook (dies/replacement.ts), the services done in the period (the one
 * service history, service-history.ts) and the billable repairs with hours and cost. The PDF
 * and the CSV are both laid out from `buildPeriodStatement`; neither computes a figure itself.
 *
 * Opening = every counted (not voided) ledger entry before the plant midnight that starts the
 * period, plus the die's opening balance from an older register (source 'opening', whatever
 * its date: shots made before Castellan). Closing = opening + the entries counted in the period.
 * Life figures are as of the statement date, from the kept totals.
 */
import { sql } from 'kysely';
import { addDaysToDate } from '../../calc/dates';
import {
	monthInWords,
	monthsOfPeriod,
	repairCost,
	resolvePeriod,
	statementReference,
	type StatementPeriod
} from '../../calc/statement-period';
import type { DieStatus } from '../../domain';
import { plantDate, plantDayStart } from '../../plant-time';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { StatementPeriodKind } from '../db/schema-settings';
import { loadReplacementOutlooks } from '../dies/replacement';
import { plantIdentity, type PlantIdentity } from '../settings/plant-identity';
import { nowIso } from '../time';
import { findOwnerCustomer } from './portfolio';
import { loadServiceHistories, type ServiceEvent } from './service-history';

export interface StatementMonth {
	/** `YYYY-MM`, or null on the opening-balance row. */
	month: string | null;
	/** "March 2026", "Opening balance", or "March 2026 (from 10 March)" for a cut month. */
	label: string;
	/** True on the first row: the balance brought forward, not shots of a month. */
	openingBalance: boolean;
	/** Shots counted in the month (0 on the opening-balance row). */
	shots: number;
	/** Die shots at the end of the month (or at the start of the period). */
	closing: number;
}

export interface StatementRepair {
	at: string;
	jobNumber: string;
	title: string;
	hours: number | null;
	/** hours × the plant's hourly rate, or null without a rate or hours. */
	cost: number | null;
}

export interface PeriodStatementDie {
	id: number;
	number: string;
	partName: string;
	partNumber: string | null;
	status: DieStatus;
	alloyName: string;
	openingShots: number;
	periodShots: number;
	closingShots: number;
	lifeUsedPct: number;
	shotsRemaining: number;
	projectedEndOfLife: string | null;
	reorderBy: string | null;
	reorderDue: boolean;
	leadDays: number;
	leadDaysFrom: 'die' | 'family';
	/** Opening-balance row first, then each month the period touches. */
	months: StatementMonth[];
	/** Services done in the period, newest first. */
	services: ServiceEvent[];
	/** The die's last service, whenever it was (the same one the portal shows). */
	lastService: ServiceEvent | null;
	repairs: StatementRepair[];
}

export interface PeriodStatement {
	reference: string;
	period: StatementPeriod;
	plant: PlantIdentity;
	customer: { id: number; code: string; name: string };
	/** When the statement was issued (life figures are as of this instant). */
	issuedAt: string;
	dies: PeriodStatementDie[];
	totals: {
		openingShots: number;
		periodShots: number;
		closingShots: number;
		repairHours: number;
		/** Null when the plant has set no hourly rate. */
		repairCost: number | null;
	};
}

/** The UTC instants that bound a period: [start, end). */
function periodInstants(period: { from: string; to: string }) {
	return { start: plantDayStart(period.from), end: plantDayStart(addDaysToDate(period.to, 1)) };
}

/**
 * The statement data of one customer for one period, or undefined for an unknown customer.
 * `reference` and `issuedAt` come from the issued statement (issueStatement).
 */
export async function buildPeriodStatement(
	db: DB,
	customerId: number,
	period: StatementPeriod,
	issue: { reference: string; issuedAt: string }
): Promise<PeriodStatement | undefined> {
	const customer = await findOwnerCustomer(db, customerId);
	if (!customer) return undefined;
	const { start, end } = periodInstants(period);
	const dies = await db
		.selectFrom('dies')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.select([
			'dies.id',
			'dies.number',
			'dies.part_name as partName',
			'dies.part_number as partNumber',
			'dies.status',
			'alloys.name as alloyName'
		])
		.where('dies.customer_id', '=', customerId)
		.orderBy('dies.number')
		.execute();
	const ids = dies.map((d) => d.id);
	const none = [-1];
	const [opening, inPeriod, outlooks, histories, plant] = await Promise.all([
		db
			.selectFrom('shot_entries')
			.select(['die_id as dieId', sql<number>`sum(shots)`.as('shots')])
			.where('die_id', 'in', ids.length ? ids : none)
			.where('voided_at', 'is', null)
			.where((eb) => eb.or([eb('counted_at', '<', start), eb('source', '=', 'opening')]))
			.groupBy('die_id')
			.execute(),
		db
			.selectFrom('shot_entries')
			.select(['die_id as dieId', 'counted_at as at', 'shots'])
			.where('die_id', 'in', ids.length ? ids : none)
			.where('voided_at', 'is', null)
			.where('source', '!=', 'opening')
			.where('counted_at', '>=', start)
			.where('counted_at', '<', end)
			.execute(),
		loadReplacementOutlooks(db, ids, issue.issuedAt),
		loadServiceHistories(db, ids),
		plantIdentity(db)
	]);

	const months = monthsOfPeriod(period.from, period.to);
	const monthStarts = months.map((m) => Date.parse(plantDayStart(m.from)));
	const openingByDie = new Map(opening.map((o) => [o.dieId, Number(o.shots)]));
	const perMonth = new Map<number, number[]>(ids.map((id) => [id, months.map(() => 0)]));
	for (const e of inPeriod) {
		const ms = Date.parse(e.at);
		let i = monthStarts.length - 1;
		while (i > 0 && ms < monthStarts[i]) i--;
		perMonth.get(e.dieId)![i] += e.shots;
	}
	const startMs = Date.parse(start);
	const endMs = Date.parse(end);
	const inside = (at: string) => {
		const ms = Date.parse(at);
		return ms >= startMs && ms < endMs;
	};

	const rows: PeriodStatementDie[] = dies.map((d) => {
		const openingShots = openingByDie.get(d.id) ?? 0;
		const shotsByMonth = perMonth.get(d.id)!;
		const periodShots = shotsByMonth.reduce((s, n) => s + n, 0);
		let running = openingShots;
		const monthRows: StatementMonth[] = [
			{
				month: null,
				label: `Opening balance (before ${period.from})`,
				openingBalance: true,
				shots: 0,
				closing: openingShots
			},
			...months.map((m, i) => {
				running += shotsByMonth[i];
				return {
					month: m.month,
					label: m.whole
						? monthInWords(m.month)
						: `${monthInWords(m.month)} (${m.from} to ${m.to})`,
					openingBalance: false,
					shots: shotsByMonth[i],
					closing: running
				};
			})
		];
		const outlook = outlooks.get(d.id);
		const history = histories.get(d.id) ?? { events: [], last: null };
		const services = history.events.filter((e) => inside(e.at));
		const repairs = services
			.filter((e) => e.kind === 'job' && e.billable)
			.map((e) => ({
				at: e.at,
				jobNumber: e.jobNumber ?? '',
				title: e.title,
				hours: e.hours,
				cost: repairCost(e.hours, plant.repairRatePerHour)
			}));
		const retired = d.status === 'retired';
		return {
			...d,
			openingShots,
			periodShots,
			closingShots: openingShots + periodShots,
			lifeUsedPct: outlook?.lifeUsedPct ?? 0,
			shotsRemaining: outlook?.shotsRemaining ?? 0,
			projectedEndOfLife: retired ? null : (outlook?.projectedEndOfLife ?? null),
			reorderBy: retired ? null : (outlook?.reorderBy ?? null),
			reorderDue: retired ? false : (outlook?.reorderDue ?? false),
			leadDays: outlook?.leadDays ?? 0,
			leadDaysFrom: outlook?.leadDaysFrom ?? 'family',
			months: monthRows,
			services,
			lastService: history.last,
			repairs
		};
	});

	const repairHours = rows.reduce(
		(s, d) => s + d.repairs.reduce((h, r) => h + (r.hours ?? 0), 0),
		0
	);
	return {
		reference: issue.reference,
		period,
		plant,
		customer: { id: customer.id, code: customer.code, name: customer.name },
		issuedAt: issue.issuedAt,
		dies: rows,
		totals: {
			openingShots: rows.reduce((s, d) => s + d.openingShots, 0),
			periodShots: rows.reduce((s, d) => s + d.periodShots, 0),
			closingShots: rows.reduce((s, d) => s + d.closingShots, 0),
			repairHours: Math.round(repairHours * 100) / 100,
			repairCost:
				plant.repairRatePerHour === null
					? null
					: Math.round(
							rows.reduce((s, d) => s + d.repairs.reduce((c, r) => c + (r.cost ?? 0), 0), 0) * 100
						) / 100
		}
	};
}

export interface IssuedStatement {
	reference: string;
	customerId: number;
	period: StatementPeriod;
	issuedAt: string;
}

/**
 * Records a statement for the period and gives it its reference. Asking again for the same
 * period on the same plant day gives the statement already issued (PDF and CSV of one request
 * share one reference); another period or another day gets the next running number.
 */
export async function issueStatement(
	db: DB,
	customer: { id: number; code: string },
	period: StatementPeriod,
	actorId: string | null,
	now = nowIso()
): Promise<IssuedStatement> {
	const day = plantDate(now);
	return writeTransaction(db, async (trx) => {
		const same = await trx
			.selectFrom('statements')
			.select(['reference', 'issued_at'])
			.where('customer_id', '=', customer.id)
			.where('issue_day', '=', day)
			.where('period_kind', '=', period.kind)
			.where('period_from', '=', period.from)
			.where('period_to', '=', period.to)
			.executeTakeFirst();
		if (same) {
			return {
				reference: same.reference,
				customerId: customer.id,
				period,
				issuedAt: same.issued_at
			};
		}
		const last = await trx
			.selectFrom('statements')
			.select((eb) => eb.fn.max('seq').as('seq'))
			.where('customer_id', '=', customer.id)
			.where('issue_day', '=', day)
			.executeTakeFirst();
		const seq = Number(last?.seq ?? 0) + 1;
		const reference = statementReference(customer.code, day, seq);
		await trx
			.insertInto('statements')
			.values({
				reference,
				customer_id: customer.id,
				period_kind: period.kind,
				period_from: period.from,
				period_to: period.to,
				issue_day: day,
				seq,
				issued_at: now,
				issued_by: actorId
			})
			.execute();
		return { reference, customerId: customer.id, period, issuedAt: now };
	});
}

/** A statement the customer was issued, by reference; undefined for another owner's. */
export async function findIssuedStatement(
	db: DB,
	customerId: number,
	reference: string
): Promise<IssuedStatement | undefined> {
	const row = await db
		.selectFrom('statements')
		.selectAll()
		.where('customer_id', '=', customerId)
		.where('reference', '=', reference)
		.executeTakeFirst();
	return row ? toIssued(row) : undefined;
}

/** The customer's issued statements, newest first. */
export async function listIssuedStatements(db: DB, customerId: number, limit = 20) {
	const rows = await db
		.selectFrom('statements')
		.selectAll()
		.where('customer_id', '=', customerId)
		.orderBy('issued_at', 'desc')
		.orderBy('id', 'desc')
		.limit(limit)
		.execute();
	return rows.map(toIssued);
}

function toIssued(row: {
	reference: string;
	customer_id: number;
	period_kind: StatementPeriodKind;
	period_from: string;
	period_to: string;
	issued_at: string;
}): IssuedStatement {
	return {
		reference: row.reference,
		customerId: row.customer_id,
		period: periodOfRow(row),
		issuedAt: row.issued_at
	};
}

/** The period of a recorded statement, named as when it was issued. */
function periodOfRow(row: {
	period_kind: StatementPeriodKind;
	period_from: string;
	period_to: string;
}): StatementPeriod {
	const year = Number(row.period_from.slice(0, 4));
	const month = Number(row.period_from.slice(5, 7));
	switch (row.period_kind) {
		case 'month':
			return resolvePeriod({ kind: 'month', year, month });
		case 'quarter':
			return resolvePeriod({ kind: 'quarter', year, quarter: Math.floor((month - 1) / 3) + 1 });
		case 'year':
			return resolvePeriod({ kind: 'year', year });
		default:
			return resolvePeriod({ kind: 'custom', from: row.period_from, to: row.period_to });
	}
}
