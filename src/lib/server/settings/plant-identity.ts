// Who the plant is on the documents and e-mails it sends: name, address, contact, logo, the
// statement footer and the hourly rate of billable toolroom work. The one place every PDF,
// e-mail, the sign-in page and the browser title read the plant's name from.
import { writeAudit } from '../audit';
import { withDisplayName } from '../mail/transport';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { nowIso } from '../time';

/** Shown until the admin sets a name (or PLANT_NAME is set for the process). */
export const DEFAULT_PLANT_NAME = 'Castellan plant';

export interface PlantIdentity {
	/** The name to print: the admin's, else PLANT_NAME, else the default. */
	name: string;
	/** False while the plant has not set a name of its own. */
	nameSet: boolean;
	address: string;
	contactEmail: string;
	contactPhone: string;
	statementFooter: string;
	/** Logo file relative to UPLOAD_DIR, or null. */
	logoFile: string | null;
	/** Cost of an hour of billable toolroom work; null = statements show hours only. */
	repairRatePerHour: number | null;
	currency: string;
}

export interface PlantIdentityInput {
	name: string;
	address: string;
	contactEmail: string;
	contactPhone: string;
	statementFooter: string;
	repairRatePerHour: number | null;
	currency: string;
}

function fallbackName(): string {
	return (typeof process !== 'undefined' && process.env.PLANT_NAME?.trim()) || DEFAULT_PLANT_NAME;
}

/** The plant's identity; empty fields stay empty, an unset name falls back (see `name`). */
export async function plantIdentity(db: DB): Promise<PlantIdentity> {
	const row = await db
		.selectFrom('plant_settings')
		.select([
			'plant_name',
			'plant_address',
			'contact_email',
			'contact_phone',
			'statement_footer',
			'logo_file',
			'repair_rate_per_hour',
			'currency'
		])
		.where('id', '=', 1)
		.executeTakeFirst();
	const own = row?.plant_name.trim() ?? '';
	return {
		name: own || fallbackName(),
		nameSet: own !== '',
		address: row?.plant_address ?? '',
		contactEmail: row?.contact_email ?? '',
		contactPhone: row?.contact_phone ?? '',
		statementFooter: row?.statement_footer ?? '',
		logoFile: row?.logo_file ?? null,
		repairRatePerHour: row?.repair_rate_per_hour ?? null,
		currency: row?.currency || 'EUR'
	};
}

/** One contact line for document headers and e-mail footers: address, e-mail, phone. */
export function plantContactLine(identity: PlantIdentity): string {
	return [identity.address.replace(/\s*\n\s*/g, ', '), identity.contactEmail, identity.contactPhone]
		.map((s) => s.trim())
		.filter(Boolean)
		.join(' · ');
}

/**
 * The From header with the plant's name as display name and the address of MAIL_FROM
 * (`"Castellan" <castellan@plant.example>` becomes `"Kestrel Works" <castellan@plant.example>`).
 */
export function mailFromFor(identity: PlantIdentity, from: string): string {
	return withDisplayName(from, identity.name);
}

/** The footer line every e-mail carries: the plant's name and contact. */
export function mailFooterFor(identity: PlantIdentity): string {
	const contact = plantContactLine(identity);
	return contact ? `${identity.name} · ${contact}` : identity.name;
}

const auditView = (i: PlantIdentity) => ({
	name: i.nameSet ? i.name : '',
	address: i.address,
	contactEmail: i.contactEmail,
	contactPhone: i.contactPhone,
	statementFooter: i.statementFooter,
	repairRatePerHour: i.repairRatePerHour,
	currency: i.currency
});

/** Saves the identity (all fields at once), audited with before and after. */
export async function savePlantIdentity(
	db: DB,
	input: PlantIdentityInput,
	actorId: string,
	now = nowIso()
): Promise<void> {
	await writeTransaction(db, async (trx) => {
		const before = await plantIdentity(trx);
		await trx
			.updateTable('plant_settings')
			.set({
				plant_name: input.name.trim(),
				plant_address: input.address.trim(),
				contact_email: input.contactEmail.trim(),
				contact_phone: input.contactPhone.trim(),
				statement_footer: input.statementFooter.trim(),
				repair_rate_per_hour: input.repairRatePerHour,
				currency: input.currency,
				updated_at: now,
				updated_by: actorId
			})
			.where('id', '=', 1)
			.execute();
		const after = await plantIdentity(trx);
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'plant.identity',
				detail: { before: auditView(before), after: auditView(after) }
			},
			now
		);
	});
}

/** Sets or clears the logo file, audited; returns the file it replaced (for the caller to remove). */
export async function savePlantLogo(
	db: DB,
	file: string | null,
	actorId: string,
	now = nowIso()
): Promise<string | null> {
	return writeTransaction(db, async (trx) => {
		const before = await plantIdentity(trx);
		await trx
			.updateTable('plant_settings')
			.set({ logo_file: file, updated_at: now, updated_by: actorId })
			.where('id', '=', 1)
			.execute();
		await writeAudit(
			trx,
			{
				userId: actorId,
				action: 'plant.logo',
				detail: {
					before: { logo: before.logoFile ? 'set' : '' },
					after: { logo: file ? 'set' : '' }
				}
			},
			now
		);
		return before.logoFile;
	});
}

export type LeadFamily = 'zinc' | 'magnesium' | 'aluminium' | 'copper';

/** The plant's replacement lead time per alloy family, days. */
export async function listLeadDefaults(db: DB): Promise<Record<LeadFamily, number>> {
	const rows = await db.selectFrom('replacement_lead_defaults').selectAll().execute();
	const result = { zinc: 84, magnesium: 84, aluminium: 84, copper: 84 };
	for (const r of rows) result[r.family] = r.lead_days;
	return result;
}

/** Saves the family lead times, audited with before and after. */
export async function saveLeadDefaults(
	db: DB,
	input: Record<LeadFamily, number>,
	actorId: string,
	now = nowIso()
): Promise<void> {
	await writeTransaction(db, async (trx) => {
		const before = await listLeadDefaults(trx);
		for (const family of Object.keys(input) as LeadFamily[]) {
			await trx
				.insertInto('replacement_lead_defaults')
				.values({ family, lead_days: input[family], updated_at: now, updated_by: actorId })
				.onConflict((oc) =>
					oc
						.column('family')
						.doUpdateSet({ lead_days: input[family], updated_at: now, updated_by: actorId })
				)
				.execute();
		}
		await writeAudit(
			trx,
			{ userId: actorId, action: 'plant.lead_defaults', detail: { before, after: input } },
			now
		);
	});
}
