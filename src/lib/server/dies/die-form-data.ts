import type { DB } from '../db/connect';

/** Choices for the die form's owner and alloy selects. */
export async function dieFormChoices(db: DB) {
	const [customers, alloys] = await Promise.all([
		db.selectFrom('customers').select(['id', 'name', 'code']).orderBy('name').execute(),
		db
			.selectFrom('alloys')
			.select(['id', 'name', 'family', 'expected_life_shots'])
			.orderBy('family')
			.orderBy('name')
			.execute()
	]);
	return { customers, alloys };
}
