import { afterEach, beforeEach, describe, expect, test } from 'vitest';
import { plantIdentitySchema, leadDefaultsSchema } from '../../src/lib/schemas/plant-identity';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { loadReplacementOutlook } from '../../src/lib/server/dies/replacement';
import { composeInvitationMail } from '../../src/lib/server/owner/invitation-mail';
import {
	DEFAULT_PLANT_NAME,
	listLeadDefaults,
	mailFooterFor,
	mailFromFor,
	plantIdentity,
	saveLeadDefaults,
	savePlantIdentity
} from '../../src/lib/server/settings/plant-identity';

let db: DB;
const ADMIN = 'admin-1';
const savedEnv = process.env.PLANT_NAME;

beforeEach(async () => {
	db = await openTestDatabase();
	delete process.env.PLANT_NAME;
	await db
		.insertInto('users')
		.values({
			id: ADMIN,
			email: 'a@p.test',
			name: 'A',
			role: 'admin',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
});
afterEach(() => {
	if (savedEnv === undefined) delete process.env.PLANT_NAME;
	else process.env.PLANT_NAME = savedEnv;
});

describe('plant identity', () => {
	test('an upgraded plant starts empty and shows the fallback name', async () => {
		const identity = await plantIdentity(db);
		expect(identity).toMatchObject({
			name: DEFAULT_PLANT_NAME,
			nameSet: false,
			address: '',
			logoFile: null,
			repairRatePerHour: null,
			currency: 'EUR'
		});
		process.env.PLANT_NAME = 'Env Works';
		expect((await plantIdentity(db)).name).toBe('Env Works');
	});

	test('saving is audited with before and after; e-mails carry the name and contact', async () => {
		const form = plantIdentitySchema.parse({
			name: 'Kestrel Casting Works',
			address: '4 Foundry Lane\nNorthbridge',
			contactEmail: 'tooling@kestrel.test',
			contactPhone: '+44 1632 960000',
			statementFooter: 'Tooling desk',
			repairRatePerHour: '62,40',
			currency: 'eur'
		});
		expect(form.repairRatePerHour).toBe(62.4);
		await savePlantIdentity(db, form, ADMIN);
		const identity = await plantIdentity(db);
		expect(identity).toMatchObject({
			name: 'Kestrel Casting Works',
			nameSet: true,
			currency: 'EUR'
		});
		const audit = await db
			.selectFrom('audit_log')
			.select(['action', 'detail'])
			.where('action', '=', 'plant.identity')
			.executeTakeFirstOrThrow();
		const detail = JSON.parse(audit.detail);
		expect(detail.before.name).toBe('');
		expect(detail.after.name).toBe('Kestrel Casting Works');
		expect(mailFromFor(identity, 'Castellan <castellan@plant.test>')).toBe(
			'"Kestrel Casting Works" <castellan@plant.test>'
		);
		expect(mailFooterFor(identity)).toBe(
			'Kestrel Casting Works · 4 Foundry Lane, Northbridge · tooling@kestrel.test · +44 1632 960000'
		);
		const mail = composeInvitationMail({
			name: 'Ola',
			email: 'ola@acme.test',
			customerName: 'Acme Pumps',
			plantName: identity.name,
			footer: mailFooterFor(identity),
			link: 'http://x.test/invite/abc',
			expiresAt: '2026-07-03T12:00:00.000Z'
		});
		expect(mail.subject).toContain('Kestrel Casting Works');
		expect(mail.text).toContain('4 Foundry Lane, Northbridge');
	});

	test('bad input names the field and changes nothing', () => {
		const bad = plantIdentitySchema.safeParse({
			name: 'X',
			address: '',
			contactEmail: 'not-an-address',
			contactPhone: 'call me',
			statementFooter: '',
			repairRatePerHour: '-5',
			currency: 'EURO'
		});
		expect(bad.success).toBe(false);
		const fields = bad.error!.issues.map((i) => i.path[0]).sort();
		expect(fields).toEqual(['contactEmail', 'contactPhone', 'currency', 'repairRatePerHour']);
	});
});

describe('replacement lead times', () => {
	test('family defaults are saved with an audit and drive the outlook of dies without their own', async () => {
		expect(await listLeadDefaults(db)).toEqual({
			zinc: 84,
			magnesium: 84,
			aluminium: 84,
			copper: 84
		});
		const form = leadDefaultsSchema.parse({
			zinc: '60',
			magnesium: '70',
			aluminium: '120',
			copper: '90'
		});
		await saveLeadDefaults(db, form, ADMIN);
		expect((await listLeadDefaults(db)).aluminium).toBe(120);
		const audit = await db
			.selectFrom('audit_log')
			.select('detail')
			.where('action', '=', 'plant.lead_defaults')
			.executeTakeFirstOrThrow();
		expect(JSON.parse(audit.detail)).toMatchObject({
			before: { aluminium: 84 },
			after: { aluminium: 120 }
		});
		expect(leadDefaultsSchema.safeParse({ ...form, zinc: '0' }).success).toBe(false);

		const alloy = await db
			.selectFrom('alloys')
			.select('id')
			.where('code', '=', 'A380')
			.executeTakeFirstOrThrow();
		await db.insertInto('customers').values({ code: 'ACME', name: 'Acme' }).execute();
		const die = await db
			.insertInto('dies')
			.values({
				number: 'D-0500',
				part_name: 'Housing',
				customer_id: 1,
				alloy_id: alloy.id,
				process: 'cold_chamber',
				cavities: 1,
				projected_area_cm2: 100,
				created_at: '2026-01-01T00:00:00.000Z',
				updated_at: '2026-01-01T00:00:00.000Z'
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		const asOf = '2026-06-30T12:00:00.000Z';
		expect(await loadReplacementOutlook(db, die.id, asOf)).toMatchObject({
			leadDays: 120,
			leadDaysFrom: 'family'
		});
	});
});
