// Tables of the toolroom area; added to the Database interface in schema.ts.
// Dates are ISO-8601 text in UTC; flags are 0/1 integers (see schema.ts).
import type { Generated, Insertable, Selectable } from 'kysely';

/** Where a toolroom job stands; done and cancelled are final. */
export type JobStatus = 'open' | 'in_progress' | 'waiting_parts' | 'done' | 'cancelled';
/** Which half the work is on. */
export type JobHalf = 'cover' | 'ejector' | 'both';
/** Where the job was opened from. */
export type JobSource = 'die' | 'service_task' | 'notice';
export type Coolant = 'water' | 'oil';
export type LeakTest = 'pass' | 'fail';
/** What a job photo shows: the die before, during or after the work. */
export type PhotoStage = 'before' | 'during' | 'after';

export interface ToolroomJobsTable {
	id: Generated<number>;
	/** `TJ-00042`, from the row id, written in the same transaction as the row. */
	number: string;
	die_id: number;
	/** 'repair', 'modification' or a service task kind (stress_relief, surface_inspection, …). */
	kind: string;
	half: JobHalf;
	zone: string | null;
	description: string;
	/** Toolmaker (or lead) the job is assigned to. */
	assigned_to: string | null;
	status: Generated<JobStatus>;
	source: JobSource;
	/** The service notice the job was opened from (notices.id), when source = 'notice'. */
	notice_id: number | null;
	/** 1 while the job keeps the die `in_toolroom`; the lead may open a job without that. */
	die_to_toolroom: Generated<number>;
	die_shots_at_open: number;
	opened_by: string | null;
	opened_at: string;
	updated_at: string;
	closed_at: string | null;
	closed_by: string | null;
	die_shots_at_close: number | null;
	findings: string | null;
	work_done: string | null;
	hours: number | null;
	parts_used: string | null;
	billable_to_owner: Generated<number>;
	/** Text written for the die's owner; shown in the owner portal only when summary_shared = 1. */
	owner_summary: string | null;
	summary_shared: Generated<number>;
	cancel_reason: string | null;
	/** Voided by the toolroom lead (with a reason): kept for history, left out of every figure. */
	voided_at: string | null;
	voided_by: string | null;
	void_reason: string | null;
	/** When the toolroom expects to release the die (ISO-8601 UTC); null when not said. */
	expected_release_at: string | null;
}

/** Service tasks a job carries out; marked done at the die's total when the job closes. */
export interface JobServiceTasksTable {
	job_id: number;
	service_task_id: number;
	/** Die total at which the task was recorded done (null until the job closes). */
	done_at_shots: number | null;
}

export interface PhotosTable {
	id: Generated<number>;
	/** Random id used in URLs, so photo addresses cannot be guessed by counting. */
	public_id: string;
	/** Exactly one of job_id / inspection_id is set. */
	job_id: number | null;
	inspection_id: number | null;
	die_id: number;
	/** Paths relative to UPLOAD_DIR, random names (never the uploader's file name). */
	full_file: string;
	thumb_file: string;
	/** Of the stored full-size JPEG, px. */
	width: number;
	height: number;
	/** sha256 hex of the stored full-size JPEG. */
	sha256: string;
	/** Size of the stored full-size JPEG. */
	bytes: number;
	thumb_bytes: number;
	source_type: 'jpeg' | 'png';
	uploaded_by: string | null;
	uploaded_at: string;
	caption: string | null;
	/** How many photos of one upload the caption was typed once for; 1 = the photo's own. */
	caption_batch: Generated<number>;
	shared_with_owner: Generated<number>;
	/** Job photos: the die before, during or after the work; null when not said. */
	stage: PhotoStage | null;
}

export interface SurfaceInspectionsTable {
	id: Generated<number>;
	die_id: number;
	/** The job the inspection was made under, if any. */
	job_id: number | null;
	half: 'cover' | 'ejector';
	/** Free text, e.g. "gate side, cavity 2"; trends group by half + zone. */
	zone: string;
	shots_at: number;
	/** Castellan surface grade 0–4 (SURFACE_GRADES in calc/crack-trend.ts). */
	grade: number;
	longest_crack_mm: number | null;
	soldering: Generated<number>;
	erosion: Generated<number>;
	notes: string | null;
	inspected_by: string | null;
	inspected_at: string;
	/** Voided by the toolroom lead (with a reason): kept for history, left out of every figure. */
	voided_at: string | null;
	voided_by: string | null;
	void_reason: string | null;
	/** The inspection this one corrects (that one is voided). */
	corrects_id: number | null;
	/** The zone from the die's own list (die_zones); null only for rows that predate the list. */
	zone_id: number | null;
	/** The physical half (die_halves.id, by serial) installed when the inspection was made. */
	half_id: number | null;
}
/** A die's surface zones, kept by the toolroom lead; inspections pick from this list. */
export interface DieZonesTable {
	id: Generated<number>;
	die_id: number;
	half: 'cover' | 'ejector';
	name: string;
	active: Generated<number>;
	created_at: string;
}
/** A zone a toolroom job repaired; the zone's crack series restarts after it. */
export interface JobRepairsTable {
	id: Generated<number>;
	job_id: number;
	zone_id: number;
	kind: 'weld' | 'insert_change' | 'remachining';
}

/**
 * Hours worked on a job, recorded at any time while it is open (and at close). The job's
 * `hours` is the kept sum of its standing (not voided) entries.
 */
export interface JobWorkEntriesTable {
	id: Generated<number>;
	job_id: number;
	hours: number;
	note: string | null;
	recorded_by: string | null;
	recorded_at: string;
	/** Voided by the toolroom lead (with a reason): kept for history, left out of the sum. */
	voided_at: string | null;
	voided_by: string | null;
	void_reason: string | null;
}

/** A part used on a job (an ejector pin, a core insert …), recorded while the job is open. */
export interface JobPartsUsedTable {
	id: Generated<number>;
	job_id: number;
	part: string;
	quantity: number;
	recorded_by: string | null;
	recorded_at: string;
	voided_at: string | null;
	voided_by: string | null;
	void_reason: string | null;
}

export interface CoolingCircuitsTable {
	id: Generated<number>;
	die_id: number;
	half: 'cover' | 'ejector';
	label: string;
	coolant: Coolant;
	channel_diameter_mm: number;
	nominal_flow_lpm: number;
	active: Generated<number>;
	created_by: string | null;
	created_at: string;
}

export interface CoolingChecksTable {
	id: Generated<number>;
	circuit_id: number;
	die_id: number;
	/** The job the check was made under, if any. */
	job_id: number | null;
	/** 1 when the line was flushed with this check (offers the plan's cooling-flush task). */
	flushed: Generated<number>;
	checked_at: string;
	checked_by: string | null;
	measured_flow_lpm: number;
	inlet_c: number;
	outlet_c: number;
	supply_pressure_bar: number | null;
	leak_test: LeakTest;
	notes: string | null;
	/** Oil circuits only: the oil's data-sheet properties at working temperature. */
	oil_density_kg_m3: number | null;
	oil_viscosity_mpa_s: number | null;
	oil_specific_heat_j_kgk: number | null;
	/** Voided by the toolroom lead (with a reason): kept for history, left out of every figure. */
	voided_at: string | null;
	voided_by: string | null;
	void_reason: string | null;
	/** The check this one corrects (that one is voided). */
	corrects_id: number | null;
	/** Why an unusual reading (outlet not warmer than inlet, flow above 3× nominal) is right. */
	unusual_reason: string | null;
}

export interface ToolroomTables {
	toolroom_jobs: ToolroomJobsTable;
	job_service_tasks: JobServiceTasksTable;
	photos: PhotosTable;
	surface_inspections: SurfaceInspectionsTable;
	cooling_circuits: CoolingCircuitsTable;
	cooling_checks: CoolingChecksTable;
	die_zones: DieZonesTable;
	job_repairs: JobRepairsTable;
	job_work_entries: JobWorkEntriesTable;
	job_parts_used: JobPartsUsedTable;
}

export type ToolroomJob = Selectable<ToolroomJobsTable>;
export type Photo = Selectable<PhotosTable>;
export type NewPhoto = Insertable<PhotosTable>;
export type SurfaceInspection = Selectable<SurfaceInspectionsTable>;
export type CoolingCircuit = Selectable<CoolingCircuitsTable>;
export type CoolingCheck = Selectable<CoolingChecksTable>;
