// Tables of the die-register import; added to the Database interface in schema.ts.
import type { Generated } from 'kysely';

export interface ImportMappingsTable {
	/** Sheet kind: 'dies', 'halves' or 'service'. */
	kind: string;
	/** JSON: { [castellanField]: sheetHeader }. */
	mapping: string;
	updated_at: string;
	updated_by: string | null;
}

export interface ImportDraftsTable {
	/** Random id; the draft belongs to the user who uploaded it. */
	id: string;
	user_id: string;
	file_name: string;
	created_at: string;
	state: Generated<'open' | 'running' | 'done' | 'failed'>;
	/** JSON: the parsed sheets, mapping, fixes, skips and choices (see lib/server/import/draft.ts). */
	payload: string;
	progress_done: Generated<number>;
	progress_total: Generated<number>;
	/** When the running commit last said it is alive (UTC); null when none runs. */
	heartbeat_at: string | null;
	/** JSON outcome of the commit. */
	result: string | null;
}

export interface ImportTables {
	import_mappings: ImportMappingsTable;
	import_drafts: ImportDraftsTable;
}
