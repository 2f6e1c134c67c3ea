import type { Generated } from 'kysely';

// The plant's own settings (one row, id 1); added to the Database interface in schema.ts.

export interface PlantSettingsTable {
	id: number;
	/** IANA time zone name; the plant's days, dates and clock times are this zone's. */
	time_zone: string;
	updated_at: string | null;
	updated_by: string | null;
	/** Plant identity for documents, e-mails and the sign-in page; '' = not set (plantIdentity). */
	plant_name: Generated<string>;
	plant_address: Generated<string>;
	contact_email: Generated<string>;
	contact_phone: Generated<string>;
	/** A line printed at the foot of every statement page. */
	statement_footer: Generated<string>;
	/** The logo, relative to UPLOAD_DIR (re-encoded PNG); null without one. */
	logo_file: string | null;
	/** What an hour of billable toolroom work costs the owner; null = hours only. */
	repair_rate_per_hour: number | null;
	/** ISO 4217 code the rate is in. */
	currency: Generated<string>;
}

/** The plant's replacement lead time per alloy family, days (used when a die has none of its own). */
export interface ReplacementLeadDefaultsTable {
	family: 'zinc' | 'magnesium' | 'aluminium' | 'copper';
	lead_days: number;
	updated_at: string | null;
	updated_by: string | null;
}

export type StatementPeriodKind = 'month' | 'quarter' | 'year' | 'custom';

/** A statement issued to a tooling owner: its reference and period, so it can be found again. */
export interface StatementsTable {
	id: Generated<number>;
	/** `ST-<customer code>-<yyyymmdd>-<seq>`, unique. */
	reference: string;
	customer_id: number;
	period_kind: StatementPeriodKind;
	/** First and last plant date of the period, both included. */
	period_from: string;
	period_to: string;
	/** Plant date of issue and the owner's running number on that day. */
	issue_day: string;
	seq: number;
	issued_at: string;
	issued_by: string | null;
}

export interface PlantSettingsTables {
	plant_settings: PlantSettingsTable;
	replacement_lead_defaults: ReplacementLeadDefaultsTable;
	statements: StatementsTable;
}
