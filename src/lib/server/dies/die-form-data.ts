import type { DB } from '../db/connect';

/** Choices for the die form's owner and alloy selects. */
export async function dieFormChoices(db: DB) {
	const [customers, alloys, leads] = await Promise.all([
		db.selectFrom('customers').select(['id', 'name', 'code']).orderBy('name').execute(),
		db
			.selectFrom('alloys')
			.select(['id', 'name', 'family', 'expected_life_shots'])
			.orderBy('family')
			.orderBy('name')
			.execute(),
		db.selectFrom('replacement_lead_defaults').select(['family', 'lead_days']).execute()
	]);
	const leadDefaults = Object.fromEntries(leads.map((l) => [l.family, l.lead_days]));
	return { customers, alloys, leadDefaults };
}
