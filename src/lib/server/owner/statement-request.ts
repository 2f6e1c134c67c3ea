/**
 * What an owner's statement download asks for — a reference issued before, or a period — turned
 * into the statement data, for the PDF and the CSV routes alike. A period that does not parse
 * goes back to the statement form with the query, where the field messages show.
 */
import { error, redirect, type RequestEvent } from '@sveltejs/kit';
import { plantToday } from '../../plant-time';
import { statementPeriodSchema } from '../../schemas/statement';
import type { DB } from '../db/connect';
import { getPhotoStore } from '../photos';
import type { PlantIdentity } from '../settings/plant-identity';
import { nowIso } from '../time';
import {
	buildPeriodStatement,
	findIssuedStatement,
	issueStatement,
	type PeriodStatement
} from './period-statement';
import { findOwnerCustomer } from './portfolio';

export async function statementForRequest(
	db: DB,
	event: RequestEvent,
	customerId: number,
	actorId: string
): Promise<PeriodStatement> {
	const params = event.url.searchParams;
	const customer = await findOwnerCustomer(db, customerId);
	if (!customer) error(404, { message: 'There is no statement for your account.' });
	const ref = params.get('ref');
	let issued;
	if (ref) {
		issued = await findIssuedStatement(db, customerId, ref);
		if (!issued) error(404, { message: `There is no statement ${ref} for your account.` });
	} else {
		const now = nowIso();
		// Without a period (an old link), the quarter so far: today's plant quarter.
		const query = params.has('kind') ? Object.fromEntries(params) : currentQuarter(now);
		const parsed = statementPeriodSchema.safeParse(query);
		if (!parsed.success) redirect(303, `/owner/statements?${params.toString()}`);
		issued = await issueStatement(db, customer, parsed.data, actorId, now);
	}
	const statement = await buildPeriodStatement(db, customerId, issued.period, issued);
	if (!statement) error(404, { message: 'There is no statement for your account.' });
	return statement;
}

function currentQuarter(now: string) {
	const today = plantToday(now);
	const month = Number(today.slice(5, 7));
	return { kind: 'quarter', year: today.slice(0, 4), quarter: String(Math.ceil(month / 3)) };
}

/** The plant's logo bytes for documents, or null (no logo, or the file is gone). */
export async function readPlantLogo(identity: PlantIdentity): Promise<Uint8Array | null> {
	if (!identity.logoFile) return null;
	return getPhotoStore().get(identity.logoFile);
}
