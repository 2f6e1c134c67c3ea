import { ownerDieQuerySchema } from '$lib/schemas/owner';
import { getDb } from '$lib/server/db';
import { listOpenDecisionsForOwner } from '$lib/server/owner/decisions';
import { requireOwner } from '$lib/server/owner/guard';
import {
	describeLastJob,
	findOwnerCustomer,
	loadOwnerDies,
	pageOwnerDies,
	summariseOwnerDies
} from '$lib/server/owner/portfolio';
import type { PageServerLoad } from './$types';

// The owner's home: its dies only, with totals over all of them and the list searched, sorted
// and paged as the URL says.
export const load: PageServerLoad = async (event) => {
	const { customerId } = requireOwner(event);
	const db = getDb();
	const query = ownerDieQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const [customer, dies, decisions] = await Promise.all([
		findOwnerCustomer(db, customerId),
		loadOwnerDies(db, customerId),
		listOpenDecisionsForOwner(db, customerId)
	]);
	const { rows, total } = pageOwnerDies(dies, query);
	return {
		query,
		customer: { name: customer?.name ?? '', code: customer?.code ?? '' },
		totals: summariseOwnerDies(dies),
		decisions: decisions.map((d) => ({
			dieNumber: d.dieNumber,
			partName: d.partName,
			question: d.question,
			quotedHours: d.quotedHours,
			quotedCost: d.quotedCost,
			askedAt: d.askedAt
		})),
		total,
		rows: rows.map((d) => ({
			number: d.number,
			partName: d.partName,
			partNumber: d.partNumber,
			status: d.status,
			totalShots: d.totalShots,
			lifeUsedPct: d.lifeUsedPct,
			shotsRemaining: d.shotsRemaining,
			projectedEndOfLife: d.projectedEndOfLife,
			retiredAt: d.retiredAt,
			nextService: d.nextService,
			lastJob: d.lastJob ? describeLastJob(d.lastJob) : null
		}))
	};
};
