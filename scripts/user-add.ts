// Creates a user from the command line — the way a new plant creates its first admin.
import { z } from 'zod';
import { ROLES } from '../src/lib/roles';
import { MIN_PASSWORD_LENGTH } from '../src/lib/schemas/auth';
import { findCustomerByCode } from '../src/lib/server/settings/customers';
import { createUser, UserInputError } from '../src/lib/server/users/users';
import { fail, openMigratedDatabase, parseCli } from './lib/cli';

const USAGE =
	'npm run user:add -- --email E --name N --role R [--customer CODE] --password P\n' +
	`  roles: ${ROLES.join(', ')}; --customer is required for (and only for) role customer`;

const { values } = parseCli(
	{
		email: { type: 'string' },
		name: { type: 'string' },
		role: { type: 'string' },
		customer: { type: 'string' },
		password: { type: 'string' }
	},
	USAGE
);

const args = z
	.object({
		email: z.string({ error: '--email is required' }).email('--email is not an e-mail address'),
		name: z.string({ error: '--name is required' }).trim().min(2, '--name is too short'),
		role: z.enum(ROLES, { error: `--role must be one of ${ROLES.join(', ')}` }),
		customer: z.string().optional(),
		password: z
			.string({ error: '--password is required' })
			.min(MIN_PASSWORD_LENGTH, `--password needs at least ${MIN_PASSWORD_LENGTH} characters`)
	})
	.safeParse(values);
if (!args.success) fail(args.error.issues.map((i) => i.message).join('; '), USAGE);
const { email, name, role, customer, password } = args.data;
if (role === 'customer' && !customer) fail('--customer CODE is required for role customer', USAGE);
if (role !== 'customer' && customer) fail('--customer is only for role customer', USAGE);

const db = await openMigratedDatabase();
try {
	let customerId: number | null = null;
	if (customer) {
		const found = await findCustomerByCode(db, customer);
		if (!found) fail(`there is no customer with code ${customer}`);
		customerId = found.id;
	}
	await createUser(db, { email, name, role, customerId, password });
	console.log(`Created ${role} ${email.toLowerCase()}.`);
} catch (err) {
	if (err instanceof UserInputError) fail(err.message);
	throw err;
} finally {
	await db.destroy();
}
