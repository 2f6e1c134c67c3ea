import { error } from '@sveltejs/kit';
import { csvResponse } from '$lib/server/csv';
import { getDb } from '$lib/server/db';
import { findOwnerDie, monthlyLedger } from '$lib/server/owner/die-page';
import { requireOwner } from '$lib/server/owner/guard';
import type { RequestHandler } from './$types';

// The die's shots by month, after one row with the balance brought forward (shots before the
// first month on record, e.g. from an older register), which is not a month's shots.
// Another owner's die answers 404, like a missing one.
export const GET: RequestHandler = async (event) => {
	const { customerId } = requireOwner(event);
	const db = getDb();
	const die = await findOwnerDie(db, customerId, event.params.number);
	if (!die) error(404, { message: 'This die is not among your tooling.' });
	const months = await monthlyLedger(db, die.id, die.total_shots);
	const first = months[0];
	const opening = first ? first.totalAtEnd - first.shots : die.total_shots;
	return csvResponse(
		`${die.number}-shots-by-month.csv`,
		['die', 'month', 'shots', 'days_run', 'total_shots_at_month_end', 'row'],
		[
			[
				die.number,
				first ? `Opening balance (before ${first.month})` : 'Opening balance',
				'',
				'',
				opening,
				'opening_balance'
			],
			...months.map((m) => [die.number, m.month, m.shots, m.daysRun, m.totalAtEnd, 'month'])
		]
	);
};
