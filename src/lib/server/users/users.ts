import { generateIdFromEntropySize } from 'lucia';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { Role } from '../db/schema';
import { hashPassword } from '../auth/password';
import { writeAudit } from '../audit';

export interface NewUserInput {
	email: string;
	name: string;
	role: Role;
	customerId: number | null;
	password: string;
	/** True when someone else (an admin) chose the password: it must be changed at first sign-in. */
	mustChangePassword?: boolean;
}

export class UserInputError extends Error {
	constructor(
		public field: string,
		message: string
	) {
		super(message);
	}
}

/** A customer id from a form must name a customer that exists (a field message, not a 500). */
export async function requireCustomer(db: DB, customerId: number) {
	const found = await db
		.selectFrom('customers')
		.select('id')
		.where('id', '=', customerId)
		.executeTakeFirst();
	if (!found)
		throw new UserInputError('customerId', 'There is no such customer; choose one from the list.');
}

export function normaliseEmail(email: string): string {
	return email.trim().toLowerCase();
}

/** Creates a user; the customer binding must match the role (customers only, and always). */
export async function createUser(db: DB, input: NewUserInput, actorId: string | null = null) {
	const email = normaliseEmail(input.email);
	if (input.role === 'customer' && input.customerId === null) {
		throw new UserInputError('customerId', 'A tooling owner account must belong to a customer.');
	}
	if (input.role === 'customer') await requireCustomer(db, input.customerId!);
	const existing = await db
		.selectFrom('users')
		.select('id')
		.where('email', '=', email)
		.executeTakeFirst();
	if (existing) throw new UserInputError('email', `There is already an account for ${email}.`);
	const id = generateIdFromEntropySize(10);
	await db
		.insertInto('users')
		.values({
			id,
			email,
			name: input.name.trim(),
			role: input.role,
			customer_id: input.role === 'customer' ? input.customerId : null,
			password_hash: await hashPassword(input.password),
			must_change_password: input.mustChangePassword ? 1 : 0
		})
		.execute();
	await writeAudit(db, {
		userId: actorId,
		action: 'user.create',
		detail: { id, email, role: input.role }
	});
	return id;
}

export async function findUserByEmail(db: DB, email: string) {
	return db
		.selectFrom('users')
		.selectAll()
		.where('email', '=', normaliseEmail(email))
		.executeTakeFirst();
}

export async function getUserById(db: DB, id: string) {
	return db.selectFrom('users').selectAll().where('id', '=', id).executeTakeFirst();
}

export async function listUsers(db: DB) {
	return db
		.selectFrom('users')
		.leftJoin('customers', 'customers.id', 'users.customer_id')
		.select([
			'users.id',
			'users.email',
			'users.name',
			'users.role',
			'users.active',
			'users.created_at',
			'customers.code as customerCode',
			'customers.name as customerName'
		])
		.orderBy('users.active', 'desc')
		.orderBy('users.name')
		.execute();
}

export async function updateUserRole(
	db: DB,
	id: string,
	role: Role,
	customerId: number | null,
	actorId: string
) {
	if (role === 'customer' && customerId === null) {
		throw new UserInputError('customerId', 'A tooling owner account must belong to a customer.');
	}
	if (role === 'customer') await requireCustomer(db, customerId!);
	await writeTransaction(db, async (trx) => {
		await trx
			.updateTable('users')
			.set({ role, customer_id: role === 'customer' ? customerId : null })
			.where('id', '=', id)
			.execute();
		// A role change takes effect at once: end the user's sessions.
		await trx.deleteFrom('sessions').where('user_id', '=', id).execute();
		await writeAudit(trx, { userId: actorId, action: 'user.role', detail: { id, role } });
	});
}

export async function setUserActive(db: DB, id: string, active: boolean, actorId: string) {
	await writeTransaction(db, async (trx) => {
		await trx
			.updateTable('users')
			.set({ active: active ? 1 : 0 })
			.where('id', '=', id)
			.execute();
		if (!active) await trx.deleteFrom('sessions').where('user_id', '=', id).execute();
		await writeAudit(trx, {
			userId: actorId,
			action: active ? 'user.enable' : 'user.disable',
			detail: { id }
		});
	});
}

/** Sets a password. Set by anyone but the user (an admin), it must be changed at next sign-in. */
export async function setUserPassword(db: DB, id: string, password: string, actorId: string) {
	const passwordHash = await hashPassword(password);
	await writeTransaction(db, async (trx) => {
		await trx
			.updateTable('users')
			.set({ password_hash: passwordHash, must_change_password: actorId === id ? 0 : 1 })
			.where('id', '=', id)
			.execute();
		await trx.deleteFrom('sessions').where('user_id', '=', id).execute();
		await writeAudit(trx, { userId: actorId, action: 'user.password', detail: { id } });
	});
}

export async function updateUserPreferences(
	db: DB,
	id: string,
	prefs: { unitSystem: 'metric' | 'us'; noticesEnabled: boolean }
) {
	await db
		.updateTable('users')
		.set({ unit_system: prefs.unitSystem, notices_enabled: prefs.noticesEnabled ? 1 : 0 })
		.where('id', '=', id)
		.execute();
}
