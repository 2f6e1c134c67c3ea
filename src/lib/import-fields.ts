// The columns the die-register import understands, per sheet kind. One list drives the mapping
// form, the preview, the templates' explanation sheet and the reader (no imports: client-safe).

export type ImportKind = 'dies' | 'halves' | 'service';
export const IMPORT_KINDS: ImportKind[] = ['dies', 'halves', 'service'];
export const IMPORT_KIND_LABELS: Record<ImportKind, string> = {
	dies: 'Dies',
	halves: 'Halves',
	service: 'Service tasks'
};

export type FieldType = 'text' | 'whole' | 'decimal' | 'date' | 'yesno' | 'process' | 'side';

export interface ImportField {
	key: string;
	label: string;
	type: FieldType;
	required: boolean;
	/** What the template's explanation sheet says: units and allowed values. */
	help: string;
	/** Other headers a sheet may use for this column (lower case); the key and label always match. */
	aliases?: string[];
}

export const IMPORT_FIELDS: Record<ImportKind, ImportField[]> = {
	dies: [
		{
			key: 'number',
			label: 'Die number',
			type: 'text',
			required: true,
			help: 'Unique in the plant, e.g. D-0101. Stored in capitals.',
			aliases: ['die', 'die no', 'die no.', 'tool number']
		},
		{
			key: 'part_name',
			label: 'Part name',
			type: 'text',
			required: true,
			help: 'What the die casts.',
			aliases: ['part']
		},
		{
			key: 'part_number',
			label: 'Part number',
			type: 'text',
			required: false,
			help: "The owner's part number (optional)."
		},
		{
			key: 'owner',
			label: 'Owner',
			type: 'text',
			required: true,
			help: 'Tooling owner: customer code or name as in Settings. An unknown owner can be created or matched in the preview.',
			aliases: ['customer', 'owner code']
		},
		{
			key: 'alloy',
			label: 'Alloy',
			type: 'text',
			required: true,
			help: 'Alloy code or name as in Settings (e.g. A380, ZAMAK 3). An unknown alloy can be created or matched in the preview.'
		},
		{
			key: 'process',
			label: 'Process',
			type: 'process',
			required: true,
			help: 'hot_chamber or cold_chamber (also: hot, cold).',
			aliases: ['chamber']
		},
		{
			key: 'cavities',
			label: 'Cavities',
			type: 'whole',
			required: true,
			help: 'Whole number, 1 or more.'
		},
		{
			key: 'projected_area_cm2',
			label: 'Projected area (cm²)',
			type: 'decimal',
			required: true,
			help: 'Square centimetres, more than 0; a point for decimals (412.5), no units in the cell.',
			aliases: ['projected area', 'area cm2']
		},
		{
			key: 'has_slides',
			label: 'Has slides',
			type: 'yesno',
			required: false,
			help: 'yes or no (blank = no).',
			aliases: ['slides']
		},
		{
			key: 'location',
			label: 'Location',
			type: 'text',
			required: false,
			help: 'Rack or bay (optional).'
		},
		{ key: 'notes', label: 'Notes', type: 'text', required: false, help: 'Free text (optional).' },
		{
			key: 'expected_life_shots',
			label: 'Expected life (shots)',
			type: 'whole',
			required: false,
			help: 'Whole number of shots; blank = the alloy default.',
			aliases: ['expected life']
		},
		{
			key: 'opening_shots',
			label: 'Opening shot count',
			type: 'whole',
			required: false,
			help: 'Shots the die has made before Castellan, whole number, no separators (125000). Entered as an opening-balance ledger entry dated on the import.',
			aliases: ['shots', 'shot count', 'current shots', 'total shots']
		},
		{
			key: 'steel',
			label: 'Steel',
			type: 'text',
			required: false,
			help: 'Steel of both halves when the Halves sheet does not list them (blank = H13).'
		},
		{
			key: 'cover_serial',
			label: 'Cover half serial',
			type: 'text',
			required: false,
			help: 'Serial of the cover half in the die now (blank = DIE-C1).'
		},
		{
			key: 'cover_installed',
			label: 'Cover half installed',
			type: 'date',
			required: false,
			help: 'Date, YYYY-MM-DD (blank = the import date).'
		},
		{
			key: 'ejector_serial',
			label: 'Ejector half serial',
			type: 'text',
			required: false,
			help: 'Serial of the ejector half in the die now (blank = DIE-E1).'
		},
		{
			key: 'ejector_installed',
			label: 'Ejector half installed',
			type: 'date',
			required: false,
			help: 'Date, YYYY-MM-DD (blank = the import date).'
		}
	],
	halves: [
		{
			key: 'die',
			label: 'Die number',
			type: 'text',
			required: true,
			help: 'A die on the Dies sheet of the same file.',
			aliases: ['number', 'die number']
		},
		{ key: 'side', label: 'Side', type: 'side', required: true, help: 'cover or ejector.' },
		{ key: 'serial', label: 'Serial', type: 'text', required: true, help: 'Unique in the plant.' },
		{ key: 'steel', label: 'Steel', type: 'text', required: false, help: 'Blank = H13.' },
		{
			key: 'hardness_hrc',
			label: 'Hardness (HRC)',
			type: 'decimal',
			required: false,
			help: 'Rockwell C, 20 to 70.'
		},
		{
			key: 'installed',
			label: 'Installed',
			type: 'date',
			required: true,
			help: 'Date, YYYY-MM-DD.'
		},
		{
			key: 'removed',
			label: 'Removed',
			type: 'date',
			required: false,
			help: 'Date, YYYY-MM-DD; blank = in the die now (one per side).'
		},
		{
			key: 'half_shots',
			label: 'Shots on this half',
			type: 'whole',
			required: false,
			help: "Removed halves: their final count. Current halves: blank = the die's opening count; a smaller number means the half went in later."
		},
		{
			key: 'removal_reason',
			label: 'Removal reason',
			type: 'text',
			required: false,
			help: 'Why a removed half came out.'
		}
	],
	service: [
		{
			key: 'die',
			label: 'Die number',
			type: 'text',
			required: true,
			help: 'A die on the Dies sheet or already in the register.',
			aliases: ['number', 'die number']
		},
		{
			key: 'task',
			label: 'Task',
			type: 'text',
			required: true,
			help: 'Service task kind as in the plan (stress_relief, surface_inspection, …).',
			aliases: ['kind', 'service']
		},
		{
			key: 'last_done',
			label: 'Last done',
			type: 'date',
			required: true,
			help: 'Date, YYYY-MM-DD.',
			aliases: ['last done date', 'done']
		},
		{
			key: 'last_done_shots',
			label: 'Shots when last done',
			type: 'whole',
			required: false,
			help: "The die's count when the task was done; not above its opening count (blank = 0)."
		},
		{
			key: 'interval_shots',
			label: 'Interval (shots)',
			type: 'whole',
			required: false,
			help: 'Blank = the plan default for the alloy family.'
		},
		{
			key: 'interval_days',
			label: 'Interval (days)',
			type: 'whole',
			required: false,
			help: 'Blank = the plan default for the alloy family.'
		}
	]
};

/** Normalised header text for matching: lower case, single spaces, no surrounding punctuation. */
export function headerKey(text: string): string {
	return text
		.toLowerCase()
		.replace(/[_\s]+/g, ' ')
		.replace(/[()]/g, '')
		.trim();
}

/** The mapping a fresh sheet gets: each field to the header that names it, if any. */
export function guessMapping(kind: ImportKind, headers: string[]): Record<string, string> {
	const byKey = new Map(headers.map((h) => [headerKey(h), h]));
	const mapping: Record<string, string> = {};
	for (const f of IMPORT_FIELDS[kind]) {
		for (const name of [f.key, f.label, ...(f.aliases ?? [])]) {
			const hit = byKey.get(headerKey(name));
			if (hit !== undefined) {
				mapping[f.key] = hit;
				break;
			}
		}
	}
	return mapping;
}
