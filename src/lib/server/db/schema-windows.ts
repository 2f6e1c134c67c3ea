// Service windows: time the toolroom reserves on a die; added to the Database interface in
// schema.ts. Dates are ISO-8601 text in UTC.
import type { Generated, Selectable } from 'kysely';

export interface ServiceWindowsTable {
	id: Generated<number>;
	die_id: number;
	starts_at: string;
	ends_at: string;
	/** A toolroom job kind (JOB_KINDS): what the job opened at the start will be. */
	kind: string;
	note: string | null;
	created_by: string | null;
	created_at: string;
	cancelled_at: string | null;
	cancelled_by: string | null;
	cancel_reason: string | null;
	/** Claimed once when the window turns into a job (by hand or by the scheduled run). */
	started_at: string | null;
	job_id: number | null;
	/** Why the start could not open a job (die retired …); null when it did. */
	start_problem: string | null;
}

export interface WindowTables {
	service_windows: ServiceWindowsTable;
}

export type ServiceWindowRow = Selectable<ServiceWindowsTable>;
