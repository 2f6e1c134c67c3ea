// Issues an API token; the secret is printed alone on the last line and never stored.
import { API_SCOPES, type ApiScope } from '../src/lib/roles';
import { createApiToken } from '../src/lib/server/auth/tokens';
import { findCustomerByCode } from '../src/lib/server/settings/customers';
import { fail, openMigratedDatabase, parseCli } from './lib/cli';

const USAGE = `npm run token:add -- --name N --scopes ${API_SCOPES.join(',')} [--customer CODE]`;
const { values } = parseCli(
	{ name: { type: 'string' }, scopes: { type: 'string' }, customer: { type: 'string' } },
	USAGE
);
if (!values.name?.trim()) fail('--name is required', USAGE);
if (!values.scopes) fail('--scopes is required', USAGE);
const scopes = values.scopes
	.split(',')
	.map((s) => s.trim())
	.filter(Boolean);
const unknown = scopes.filter((s) => !API_SCOPES.includes(s as ApiScope));
if (unknown.length || scopes.length === 0) {
	fail(`unknown scope ${unknown.join(', ') || '(none)'}; use ${API_SCOPES.join(', ')}`, USAGE);
}

const db = await openMigratedDatabase();
try {
	let customerId: number | null = null;
	if (values.customer) {
		const found = await findCustomerByCode(db, values.customer);
		if (!found) fail(`there is no customer with code ${values.customer}`);
		customerId = found.id;
	}
	const { token } = await createApiToken(db, {
		name: values.name.trim(),
		scopes: scopes as ApiScope[],
		customerId,
		createdBy: null
	});
	console.log(
		`Token "${values.name.trim()}" with ${scopes.join(', ')}${values.customer ? ` for ${values.customer}` : ''}. Shown once:`
	);
	console.log(token);
} finally {
	await db.destroy();
}
