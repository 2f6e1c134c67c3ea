import type { Migration } from 'kysely';
import * as createFoundation from './2026_12_01_2200_create_foundation';
import * as insertReferenceAlloys from './2026_12_01_2210_insert_reference_alloys';
import * as createToolroom from './2026_12_01_2300_create_toolroom';
import * as createSchedule from './2026_12_01_2310_create_schedule';
import * as createNotices from './2026_12_01_2320_create_notices';
import * as addShotIndexes from './2026_12_01_2330_add_shot_indexes';
import * as createInvitations from './2026_12_01_2340_create_invitations';
import * as addLedgerReview from './2026_12_03_1001_add_ledger_review';
import * as addRecordVoids from './2026_12_03_1101_add_record_voids';
import * as createPlantSettings from './2026_12_03_1201_create_plant_settings';
import * as addVerdictFacts from './2026_12_03_1301_add_verdict_facts';
import * as widenNoticeKinds from './2026_12_03_1401_widen_notice_kinds';
import * as addCoolingLock from './2026_12_03_1402_add_cooling_lock';
import * as linkRecordsToJobs from './2026_12_03_1501_link_records_to_jobs';
import * as addAccountSafeguards from './2026_12_03_1601_add_account_safeguards';
import * as createImportTables from './2026_12_03_1701_create_import_tables';
import * as createPressFeed from './2026_12_03_1800_create_press_feed';
import * as scopeIdempotencyKeys from './2026_12_03_1900_scope_idempotency_keys';
import * as addReplacementLeadTime from './2026_12_03_1950_add_replacement_lead_time';
import * as addBookingPlan from './2026_12_03_2001_add_booking_plan';
import * as createServiceWindows from './2026_12_03_2101_create_service_windows';
import * as createJobEntries from './2026_12_03_2301_create_job_entries';
import * as addPlantIdentity from './2026_12_04_0101_add_plant_identity';
import * as widenOwnerNoticeKinds from './2026_12_04_0201_widen_owner_notice_kinds';
import * as createOwnerDecisions from './2026_12_04_0202_create_owner_decisions';
import * as addPhotoCaptionBatch from './2026_12_04_0203_add_photo_caption_batch';
import * as widenMillisecondColumns from './2026_12_05_0201_widen_millisecond_columns';
import * as createJobRuns from './2026_12_05_0202_create_job_runs';
import * as addImportHeartbeat from './2026_12_05_0301_add_import_heartbeat';

// Every migration is listed here by name so the same list works in the built app, in Vitest and
// in tsx scripts (none of which share a way to glob the folder). Add new ones at the end.
export const migrations: Record<string, Migration> = {
	'2026_12_01_2200_create_foundation': createFoundation,
	'2026_12_01_2210_insert_reference_alloys': insertReferenceAlloys,
	'2026_12_01_2300_create_toolroom': createToolroom,
	'2026_12_01_2310_create_schedule': createSchedule,
	'2026_12_01_2320_create_notices': createNotices,
	'2026_12_01_2330_add_shot_indexes': addShotIndexes,
	'2026_12_01_2340_create_invitations': createInvitations,
	'2026_12_03_1001_add_ledger_review': addLedgerReview,
	'2026_12_03_1101_add_record_voids': addRecordVoids,
	'2026_12_03_1201_create_plant_settings': createPlantSettings,
	'2026_12_03_1301_add_verdict_facts': addVerdictFacts,
	'2026_12_03_1401_widen_notice_kinds': widenNoticeKinds,
	'2026_12_03_1402_add_cooling_lock': addCoolingLock,
	'2026_12_03_1501_link_records_to_jobs': linkRecordsToJobs,
	'2026_12_03_1601_add_account_safeguards': addAccountSafeguards,
	'2026_12_03_1701_create_import_tables': createImportTables,
	'2026_12_03_1800_create_press_feed': createPressFeed,
	'2026_12_03_1900_scope_idempotency_keys': scopeIdempotencyKeys,
	'2026_12_03_1950_add_replacement_lead_time': addReplacementLeadTime,
	'2026_12_03_2001_add_booking_plan': addBookingPlan,
	'2026_12_03_2101_create_service_windows': createServiceWindows,
	'2026_12_03_2301_create_job_entries': createJobEntries,
	'2026_12_04_0101_add_plant_identity': addPlantIdentity,
	'2026_12_04_0201_widen_owner_notice_kinds': widenOwnerNoticeKinds,
	'2026_12_04_0202_create_owner_decisions': createOwnerDecisions,
	'2026_12_04_0203_add_photo_caption_batch': addPhotoCaptionBatch,
	'2026_12_05_0201_widen_millisecond_columns': widenMillisecondColumns,
	'2026_12_05_0202_create_job_runs': createJobRuns,
	'2026_12_05_0301_add_import_heartbeat': addImportHeartbeat
};
