// Shared by the owner-mail tests: the shot plant (shots-fixture.ts) with a portal user and a
// contact address for ACME, a portal user for BOLT, and a fake mail server with a mailer.
import { afterAll, beforeAll } from 'vitest';
import { startFakeMail, type FakeMail } from '../../fakes/mail/server';
import { createMailer, type Mailer } from '../../src/lib/server/mail/transport';
import { makeShotPlant, type ShotPlant } from './shots-fixture';

export const ORIGIN = 'https://castellan.test';
export const ACME_USER = 'buyer@acme.test';
export const ACME_CONTACT = 'tooling@acme.test';
export const BOLT_USER = 'buyer@bolt.test';

/** Starts one fake mail server and mailer for the file; `mail()` and `mailer()` read them. */
export function useFakeMail() {
	let mail: FakeMail;
	let mailer: Mailer;
	beforeAll(async () => {
		mail = await startFakeMail({ smtpPort: 0, httpPort: 0 });
		mailer = createMailer({
			smtpUrl: `smtp://127.0.0.1:${mail.smtpPort}`,
			from: 'Castellan <castellan@plant.test>'
		});
	});
	afterAll(async () => {
		mailer.close();
		await mail.close();
	});
	return { mail: () => mail, mailer: () => mailer };
}

/** The shot plant with the owners' contacts: ACME's user Ada Acme (u-acme), BOLT's Bob Bolt. */
export async function makeOwnerPlant(): Promise<ShotPlant> {
	const p = await makeShotPlant();
	await p.db
		.updateTable('customers')
		.set({ contact_email: ACME_CONTACT })
		.where('id', '=', p.owners.acme)
		.execute();
	await p.db
		.insertInto('users')
		.values([
			{
				id: 'u-acme',
				email: ACME_USER,
				name: 'Ada Acme',
				role: 'customer',
				customer_id: p.owners.acme,
				password_hash: 'x'
			},
			{
				id: 'u-bolt',
				email: BOLT_USER,
				name: 'Bob Bolt',
				role: 'customer',
				customer_id: p.owners.bolt,
				password_hash: 'x'
			}
		])
		.execute();
	return p;
}
