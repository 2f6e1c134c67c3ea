/**
 * What a die's owner is told about the die's life: passing 80 % and 95 % of its expected life,
 * and the day its reorder-by date comes. Every figure comes from loadReplacementOutlooks (the one
 * place for life used, shots remaining, projected end of life and reorder-by).
 *
 * Each is told once per set of active halves: the key names the die, its active halves and the
 * point passed, so a run, a restart or a second process writes nothing twice, while replacing a
 * half (the die's life restarts with the new steel) makes the next crossing news again. Only the
 * highest life point passed is reported (a die found at 97 % hears "95 %", never "80 %" after it).
 */
import type { DB } from '../db/connect';
import { loadReplacementOutlooks } from '../dies/replacement';
import { formatPct } from '../../format';
import type { NoticeItem, NoticeRecipient } from './types';

/** Life used thresholds (percent) the owner hears about, highest first. */
export const OWNER_LIFE_THRESHOLDS = [95, 80] as const;

export interface OwnerNoticeGroup {
	customerId: number;
	items: NoticeItem[];
}

/** Owner life items as of `asOf`, grouped by the die's owner; retired dies are never told. */
export async function findOwnerLifeItems(db: DB, asOf: string): Promise<OwnerNoticeGroup[]> {
	const [dies, halves] = await Promise.all([
		db
			.selectFrom('dies')
			.innerJoin('customers', 'customers.id', 'dies.customer_id')
			.select([
				'dies.id',
				'dies.number',
				'dies.part_name',
				'dies.customer_id',
				'customers.name as customer_name'
			])
			.where('dies.status', '!=', 'retired')
			.orderBy('dies.number')
			.execute(),
		db
			.selectFrom('die_halves')
			.innerJoin('dies', 'dies.id', 'die_halves.die_id')
			.select(['die_halves.die_id', 'die_halves.id'])
			.where('die_halves.active', '=', 1)
			.where('dies.status', '!=', 'retired')
			.orderBy('die_halves.id')
			.execute()
	]);
	if (dies.length === 0) return [];
	const halvesOf = new Map<number, number[]>();
	for (const h of halves) halvesOf.set(h.die_id, [...(halvesOf.get(h.die_id) ?? []), h.id]);
	const outlooks = await loadReplacementOutlooks(
		db,
		dies.map((d) => d.id),
		asOf
	);
	const groups = new Map<number, NoticeItem[]>();
	for (const die of dies) {
		const o = outlooks.get(die.id);
		if (!o) continue;
		const steel = halvesOf.get(die.id)?.join('+') ?? 'die';
		const facts = {
			kind: 'owner_life' as const,
			dieNumber: die.number,
			partName: die.part_name,
			customerName: die.customer_name,
			lifeUsedPct: o.lifeUsedPct,
			shotsRemaining: o.shotsRemaining,
			projectedEndOfLife: o.projectedEndOfLife,
			reorderBy: o.reorderBy,
			leadDays: o.leadDays
		};
		const items: NoticeItem[] = [];
		const passed = OWNER_LIFE_THRESHOLDS.find((t) => o.lifeUsedPct >= t);
		if (passed !== undefined) {
			items.push({
				key: `ownerlife:${die.id}:${steel}:${passed}`,
				kind: 'owner_life',
				level: passed === 95 ? 'life_95' : 'life_80',
				dieId: die.id,
				subject: `${die.number} has used ${formatPct(o.lifeUsedPct)} of its expected life`,
				payload: { ...facts, threshold: passed }
			});
		}
		if (o.reorderDue) {
			items.push({
				key: `ownerlife:${die.id}:${steel}:reorder`,
				kind: 'owner_life',
				level: 'reorder_due',
				dieId: die.id,
				subject: `${die.number}: time to order its replacement (reorder by ${o.reorderBy})`,
				payload: { ...facts, threshold: null }
			});
		}
		if (items.length)
			groups.set(die.customer_id, [...(groups.get(die.customer_id) ?? []), ...items]);
	}
	return [...groups].map(([customerId, items]) => ({ customerId, items }));
}

/**
 * Who hears about a customer's dies: its active portal users with notices switched on, and the
 * customer's contact e-mail. An address is listed once (compared without case).
 */
export async function listOwnerRecipients(
	db: DB,
	customerIds: readonly number[]
): Promise<Map<number, NoticeRecipient[]>> {
	const result = new Map<number, NoticeRecipient[]>();
	if (customerIds.length === 0) return result;
	const ids = [...new Set(customerIds)];
	const [users, customers] = await Promise.all([
		db
			.selectFrom('users')
			.select(['id', 'email', 'name', 'customer_id'])
			.where('role', '=', 'customer')
			.where('customer_id', 'in', ids)
			.where('active', '=', 1)
			.where('notices_enabled', '=', 1)
			.orderBy('email')
			.execute(),
		db
			.selectFrom('customers')
			.select(['id', 'name', 'contact_email'])
			.where('id', 'in', ids)
			.execute()
	]);
	const add = (customerId: number, r: NoticeRecipient) => {
		const list = result.get(customerId) ?? [];
		if (!list.some((x) => x.email.toLowerCase() === r.email.toLowerCase())) list.push(r);
		result.set(customerId, list);
	};
	for (const u of users) add(u.customer_id!, { email: u.email, name: u.name, userId: u.id });
	for (const c of customers) {
		const email = c.contact_email?.trim();
		if (email) add(c.id, { email, name: c.name, userId: null });
	}
	return result;
}
