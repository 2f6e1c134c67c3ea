import type { Generated, Insertable, Selectable, Updateable } from 'kysely';

import type {
	AlloyFamily,
	DieProcess,
	DieStatus,
	HalfSide,
	RetirementReason,
	Role,
	ShotSource
} from '../../domain';

import type { ToolroomTables } from './schema-toolroom';
import type { ScheduleTables } from './schema-schedule';
import type { NoticesTables } from './schema-notices';
import type { InvitationsTables } from './schema-invitations';
import type { PlantSettingsTables } from './schema-settings';
import type { ImportTables } from './schema-import';
import type { WindowTables } from './schema-windows';
import type { OwnerDecisionTables } from './schema-owner';

export type { AlloyFamily, DieProcess, DieStatus, HalfSide, RetirementReason, Role, ShotSource };

/** 0/1 integer as SQLite stores booleans. */
export type Flag = number;

export interface CustomersTable {
	id: Generated<number>;
	code: string;
	name: string;
	contact_email: string | null;
	created_at: Generated<string>;
}

export interface UsersTable {
	id: string;
	email: string;
	name: string;
	role: Role;
	customer_id: number | null;
	password_hash: string;
	active: Generated<Flag>;
	unit_system: Generated<'metric' | 'us'>;
	notices_enabled: Generated<Flag>;
	created_at: Generated<string>;
	/** 1 after an admin set the password: the user must choose a new one at the next sign-in. */
	must_change_password: Generated<Flag>;
}

export interface SessionsTable {
	id: string;
	user_id: string;
	/** Unix time in milliseconds. */
	expires_at: number;
}

export interface SignInFailuresTable {
	bucket: string;
	failures: number;
	window_started_at: number;
}

export interface ApiTokensTable {
	id: Generated<number>;
	name: string;
	token_hash: string;
	token_prefix: string;
	/** Comma-separated scopes. */
	scopes: string;
	customer_id: number | null;
	created_by: string | null;
	created_at: Generated<string>;
	last_used_at: string | null;
	revoked_at: string | null;
	/** The token stops working at this instant; null = no expiry. */
	expires_at: string | null;
}

export interface AlloysTable {
	id: Generated<number>;
	code: string;
	name: string;
	family: AlloyFamily;
	expected_life_shots: number;
	density_kg_m3: number | null;
	specific_heat_j_kgk: number | null;
	/** Specific heat of the liquid; null = not recorded (the solid's value stands in). */
	specific_heat_liquid_j_kgk: number | null;
	latent_heat_j_kg: number | null;
	solidus_c: number | null;
	liquidus_c: number | null;
	pour_temp_c: number | null;
	source_note: string | null;
}

export interface MachinesTable {
	id: Generated<number>;
	name: string;
	chamber: 'hot' | 'cold';
	clamp_force_kn: number;
	max_shot_weight_kg: number | null;
	tie_bar_spacing_mm: number | null;
	status: Generated<'available' | 'down'>;
	notes: string | null;
	/** Minutes to change the die on this press, added to every booking's run time. */
	die_change_minutes: Generated<number>;
	/** Minutes to bring a die to temperature on this press, added to every booking's run time. */
	preheat_minutes: Generated<number>;
	/** The press's usual rate, shots per hour; null = the alloy family's usual rate. */
	shots_per_hour: number | null;
}

export interface DiesTable {
	id: Generated<number>;
	number: string;
	part_name: string;
	part_number: string | null;
	customer_id: number;
	alloy_id: number;
	process: DieProcess;
	cavities: number;
	projected_area_cm2: number;
	has_slides: Generated<Flag>;
	status: Generated<DieStatus>;
	location: string | null;
	notes: string | null;
	expected_life_shots: number | null;
	total_shots: Generated<number>;
	last_counted_at: string | null;
	created_at: Generated<string>;
	updated_at: Generated<string>;
	retired_at: string | null;
	/** The die's own intensification (metal) pressure, bar; null = the family default. */
	metal_pressure_bar: number | null;
	/** Set when retired: why (only worn_out and cracked are wear failures). */
	retirement_reason: RetirementReason | null;
	/** 1 when the toolroom lead has locked the die's cooling circuit list against edits. */
	cooling_locked: Generated<Flag>;
	/** Days to get a replacement die; null = the plant's default for the alloy family. */
	replacement_lead_days: number | null;
	/** The die's own planned rate, shots per hour, over the press's; null = none recorded. */
	shots_per_hour: number | null;
}

export interface DieHalvesTable {
	id: Generated<number>;
	die_id: number;
	side: HalfSide;
	serial: string;
	steel: string | null;
	hardness_hrc: number | null;
	shots: Generated<number>;
	active: Generated<Flag>;
	installed_at: string;
	die_shots_at_install: Generated<number>;
	removed_at: string | null;
	removal_reason: string | null;
	/** Null: the die's expected life applies. */
	expected_life_shots: number | null;
	/** Optional picture of the half for picking surface zones (photos.id). */
	picture_photo_id: number | null;
}

export interface ShotEntriesTable {
	id: Generated<number>;
	die_id: number;
	machine_id: number | null;
	counted_at: string;
	shots: number;
	counter_start: number | null;
	counter_end: number | null;
	source: ShotSource;
	idem_key: string | null;
	/** Whose key it is: 'plant', or 'customer:{id}' for a customer-bound token. */
	key_scope: Generated<string>;
	entered_by: string | null;
	token_id: number | null;
	note: string | null;
	created_at: string;
	/** 1 when the counter went back (controller swap); reset_reason says why. */
	counter_reset: Generated<Flag>;
	reset_reason: string | null;
	/** Plausibility warnings the entry was accepted with (one per line). */
	warning: string | null;
	review_state: ReviewState | null;
	reviewed_by: string | null;
	reviewed_at: string | null;
	review_reason: string | null;
	/** A voided entry stays in the ledger, counts nothing and is shown struck through. */
	voided_at: string | null;
	voided_by: string | null;
	void_reason: string | null;
	/** The entry this one corrects (which was voided in the same transaction). */
	replaces_id: number | null;
}

/** to_review: accepted through the API with warnings; confirmed: a person gave a reason. */
export type ReviewState = 'to_review' | 'confirmed';

export interface ShotDailyTable {
	die_id: number;
	/** YYYY-MM-DD, plant date (the plant's time zone; see plant_settings). */
	day: string;
	shots: number;
}

export interface ServiceTemplatesTable {
	id: Generated<number>;
	family: AlloyFamily;
	kind: string;
	interval_shots: number | null;
	interval_days: number | null;
}

export interface ServiceTasksTable {
	id: Generated<number>;
	die_id: number;
	kind: string;
	interval_shots: number | null;
	interval_days: number | null;
	last_done_at: string;
	last_done_shots: Generated<number>;
	active: Generated<Flag>;
}

export interface AuditLogTable {
	id: Generated<number>;
	at: string;
	user_id: string | null;
	token_id: number | null;
	action: string;
	die_id: number | null;
	/** JSON text. */
	detail: Generated<string>;
}

export interface Database
	extends
		ToolroomTables,
		ScheduleTables,
		NoticesTables,
		InvitationsTables,
		PlantSettingsTables,
		ImportTables,
		WindowTables,
		OwnerDecisionTables {
	customers: CustomersTable;
	users: UsersTable;
	sessions: SessionsTable;
	sign_in_failures: SignInFailuresTable;
	api_tokens: ApiTokensTable;
	alloys: AlloysTable;
	machines: MachinesTable;
	dies: DiesTable;
	die_halves: DieHalvesTable;
	shot_entries: ShotEntriesTable;
	shot_daily: ShotDailyTable;
	service_templates: ServiceTemplatesTable;
	service_tasks: ServiceTasksTable;
	audit_log: AuditLogTable;
}

export type Customer = Selectable<CustomersTable>;
export type User = Selectable<UsersTable>;
export type NewUser = Insertable<UsersTable>;
export type Alloy = Selectable<AlloysTable>;
export type NewAlloy = Insertable<AlloysTable>;
export type Machine = Selectable<MachinesTable>;
export type Die = Selectable<DiesTable>;
export type NewDie = Insertable<DiesTable>;
export type DieUpdate = Updateable<DiesTable>;
export type DieHalf = Selectable<DieHalvesTable>;
export type ShotEntry = Selectable<ShotEntriesTable>;
export type ServiceTask = Selectable<ServiceTasksTable>;
export type ApiToken = Selectable<ApiTokensTable>;
