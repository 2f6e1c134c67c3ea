import type { DB } from '../db/connect';

export async function listCustomers(db: DB) {
	return db
		.selectFrom('customers')
		.select((eb) => [
			'customers.id',
			'customers.code',
			'customers.name',
			'customers.contact_email',
			eb
				.selectFrom('dies')
				.select(eb.fn.countAll<number>().as('n'))
				.whereRef('dies.customer_id', '=', 'customers.id')
				.as('dieCount')
		])
		.orderBy('customers.name')
		.execute();
}

export async function findCustomerByCode(db: DB, code: string) {
	return db
		.selectFrom('customers')
		.selectAll()
		.where('code', '=', code.trim().toUpperCase())
		.executeTakeFirst();
}

export async function saveCustomer(
	db: DB,
	input: { id?: number | null; code: string; name: string; contactEmail: string | null }
): Promise<{ ok: true; id: number } | { ok: false; field: 'code'; message: string }> {
	const code = input.code.trim().toUpperCase();
	const clash = await db
		.selectFrom('customers')
		.select('id')
		.where('code', '=', code)
		.$if(!!input.id, (q) => q.where('id', '!=', input.id!))
		.executeTakeFirst();
	if (clash) return { ok: false, field: 'code', message: `The code ${code} is already in use.` };
	const values = { code, name: input.name.trim(), contact_email: input.contactEmail || null };
	if (input.id) {
		await db.updateTable('customers').set(values).where('id', '=', input.id).execute();
		return { ok: true, id: input.id };
	}
	const row = await db
		.insertInto('customers')
		.values(values)
		.returning('id')
		.executeTakeFirstOrThrow();
	return { ok: true, id: row.id };
}
