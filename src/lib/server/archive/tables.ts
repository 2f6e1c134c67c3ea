// What the plant archive (export everything) holds: one CSV per table, in this order, with a
// plain description of each for README.txt. Tables not listed are never exported: sessions,
// sign-in throttling, import drafts and the migration bookkeeping hold nothing a plant needs back.

export interface ArchiveTable {
	table: string;
	file: string;
	about: string;
	/** Columns written as a placeholder instead of their value (secrets). */
	redact?: Record<string, string>;
}

export const ARCHIVE_TABLES: ArchiveTable[] = [
	{
		table: 'customers',
		file: 'customers.csv',
		about: 'Tooling owners: code, name, contact e-mail.'
	},
	{
		table: 'plant_settings',
		file: 'plant_settings.csv',
		about: 'The plant: its time zone (IANA name) and other plant-wide settings.'
	},
	{
		table: 'statements',
		file: 'statements.csv',
		about:
			'Statements issued to tooling owners: reference, owner (customers.id), period (plant dates, both included), issued at (UTC).'
	},
	{
		table: 'users',
		file: 'users.csv',
		about:
			'People who sign in. Passwords are not exported: after a restore each person sets a new one (admin: npm run user:add).',
		redact: { password_hash: '!' }
	},
	{
		table: 'api_tokens',
		file: 'api_tokens.csv',
		about:
			'API tokens by name and scope (ledger rows name them). Secrets are not exported; restored tokens are revoked.',
		redact: { token_hash: '!' }
	},
	{
		table: 'alloys',
		file: 'alloys.csv',
		about: 'Alloys with their family, expected die life (shots) and thermal data.'
	},
	{
		table: 'service_templates',
		file: 'service_templates.csv',
		about: 'Default service plan per alloy family: task kind, interval in shots and/or days.'
	},
	{
		table: 'machines',
		file: 'presses.csv',
		about:
			'Presses: name, hot/cold chamber, clamp force (kN), shot weight (kg), tie-bar spacing (mm).'
	},
	{
		table: 'dies',
		file: 'dies.csv',
		about:
			'The die register: number, part, owner (customers.id), alloy (alloys.id), process, cavities, projected area (cm²), status, total shots, last counted at (UTC).'
	},
	{
		table: 'die_halves',
		file: 'halves.csv',
		about:
			'Cover and ejector halves: serial, steel, hardness (HRC), shots on the half, current (active = 1) or removed, installed/removed (UTC), die total at install.'
	},
	{
		table: 'die_zones',
		file: 'die_zones.csv',
		about: 'Each die’s surface zones (per half), kept by the toolroom lead; inspections name one.'
	},
	{
		table: 'service_tasks',
		file: 'service_tasks.csv',
		about:
			"Each die's service plan: task kind, intervals, last done at (UTC) and the die total then."
	},
	{
		table: 'shot_entries',
		file: 'ledger.csv',
		about:
			'The shot ledger: one row per count (shots, counted at UTC, source: manual, csv, api, correction, seed, opening = opening balance).'
	},
	{
		table: 'shot_daily',
		file: 'ledger_daily.csv',
		about: 'Shots per die per UTC day, kept with the ledger.'
	},
	{
		table: 'toolroom_jobs',
		file: 'jobs.csv',
		about:
			'Toolroom jobs: number, die, kind, half, status, who and when, findings, work done, hours.'
	},
	{
		table: 'job_repairs',
		file: 'job_repairs.csv',
		about:
			'Zones a toolroom job repaired (weld, insert change, re-machining); crack series restart after them.'
	},
	{
		table: 'job_service_tasks',
		file: 'job_service_tasks.csv',
		about: 'Service tasks a job carried out, with the die total when done.'
	},
	{
		table: 'job_work_entries',
		file: 'job_work_entries.csv',
		about:
			'Hours worked on toolroom jobs, entry by entry (a job’s hours are the sum of those not voided).'
	},
	{
		table: 'job_parts_used',
		file: 'job_parts_used.csv',
		about: 'Parts used on toolroom jobs: part and quantity, with voids.'
	},
	{
		table: 'surface_inspections',
		file: 'inspections.csv',
		about:
			'Surface inspections: half, zone, die total, grade 0–4, longest crack (mm), soldering, erosion.'
	},
	{
		table: 'cooling_circuits',
		file: 'cooling_circuits.csv',
		about: 'Cooling circuits: half, label, coolant, channel diameter (mm), nominal flow (L/min).'
	},
	{
		table: 'cooling_checks',
		file: 'cooling_checks.csv',
		about:
			'Cooling checks: measured flow (L/min), inlet/outlet (°C), supply pressure (bar), leak test.'
	},
	{
		table: 'press_bookings',
		file: 'bookings.csv',
		about: 'Press bookings: die, press, start/end (UTC), order, parts, scrap %, shots per hour.'
	},
	{
		table: 'photos',
		file: 'photos.csv',
		about:
			'Photos: the job or inspection they belong to, file names under photos/ in this archive, size, sha256.'
	},
	{
		table: 'owner_decisions',
		file: 'owner_decisions.csv',
		about:
			"Questions put to a die's owner (quoted repair hours and cost) and the owner's answer, who and when (UTC)."
	},
	{
		table: 'audit_log',
		file: 'audit_log.csv',
		about: 'Who changed what and when (detail as JSON).'
	},
	{
		table: 'press_feed',
		file: 'press_feed.csv',
		about:
			'What each press last reported through counted shots: die, counter, when counted and received (UTC).'
	},
	{
		table: 'import_mappings',
		file: 'import_mappings.csv',
		about: "The plant's remembered import column mapping."
	}
];
