import type { AlloyFamily } from '../../calc/life';
import type { ImportKind } from '../../import-fields';
import type { ImportSheet } from './read-file';

export type ImportMode = 'create' | 'update';

/** What the user chose for an owner or alloy name the register does not know. */
export type OwnerChoice = { customerId: number } | { create: { code: string; name: string } };
export type AlloyChoice =
	{ alloyId: number } | { create: { code: string; name: string; family: AlloyFamily } };

/** Everything between upload and commit; kept as JSON in import_drafts.payload. */
export interface ImportPayload {
	fileName: string;
	sheets: ImportSheet[];
	/** Per sheet kind: Castellan field → the sheet's header. */
	mapping: Partial<Record<ImportKind, Record<string, string>>>;
	mode: ImportMode;
	/** `${kind}:${rowIndex}:${field}` → replacement cell text typed in the preview. */
	fixes: Record<string, string>;
	/** `${kind}:${rowIndex}` of rows left out. */
	skips: string[];
	owners: Record<string, OwnerChoice>;
	alloys: Record<string, AlloyChoice>;
}

export interface RowProblem {
	field: string;
	message: string;
}

export interface RowPreview {
	/** 0-based index among the sheet's data rows. */
	index: number;
	/** Row number as the spreadsheet shows it (header = 1). */
	line: number;
	skipped: boolean;
	/** The mapped cells as text (after fixes), for the preview table. */
	cells: Record<string, string>;
	problems: RowProblem[];
	/** Update mode: the fields this row changes. */
	changes?: { field: string; from: string; to: string }[];
	action: 'create' | 'update' | 'unchanged' | 'skip' | 'problem';
}

export interface ImportPreview {
	mode: ImportMode;
	sheets: { kind: ImportKind; name: string; rows: RowPreview[] }[];
	/** Problems of the file as a whole (a required column not mapped, a column not allowed). */
	fileProblems: string[];
	unknownOwners: string[];
	unknownAlloys: string[];
	counts: {
		rows: number;
		problemRows: number;
		skipped: number;
		create: number;
		update: number;
		unchanged: number;
		halves: number;
		tasks: number;
		openingShots: number;
		newOwners: number;
		newAlloys: number;
	};
	ready: boolean;
}

/** What a commit (or a dry run) did, or would do. */
export interface ImportOutcome {
	dryRun: boolean;
	created: string[];
	updated: string[];
	unchanged: number;
	halves: number;
	tasks: number;
	openingShots: number;
	newOwners: string[];
	newAlloys: string[];
	auditEntries: number;
}
