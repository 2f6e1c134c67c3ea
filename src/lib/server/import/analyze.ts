import { DEFAULT_EXPECTED_LIFE_BY_FAMILY, type AlloyFamily } from '../../calc/life';
import { IMPORT_FIELDS, type ImportKind } from '../../import-fields';
import { dieFormSchema, type DieForm } from '../../schemas/die';
import type { Die, DieProcess, HalfSide } from '../db/schema';
import type { SqlSession } from '../db/session';
import { MAX_SHOTS_PER_ENTRY } from '../shots/ledger';
import { cellText, readImportDate, readImportNumber, type Cell } from './read-value';
import type { ImportPayload, ImportPreview, RowPreview, RowProblem } from './types';

/** A die to create, typed and checked. */
export interface PlannedDie {
	line: number;
	form: DieForm;
	ownerKey: string;
	alloyKey: string;
	family: AlloyFamily;
	opening: number;
	halves: PlannedHalf[];
}
export interface PlannedHalf {
	side: HalfSide;
	serial: string;
	steel: string;
	hardnessHrc: number | null;
	installedAt: string;
	removedAt: string | null;
	removalReason: string | null;
	/** Removed halves: the final count. Current halves: shots since install (from the opening). */
	shots: number;
}
export interface PlannedUpdate {
	dieId: number;
	number: string;
	set: Record<string, string | number | null>;
	changes: { field: string; from: string; to: string }[];
}
export interface PlannedTask {
	dieNumber: string;
	kind: string;
	lastDoneAt: string;
	lastDoneShots: number;
	intervalShots: number | null | undefined;
	intervalDays: number | null | undefined;
}
export interface ImportPlan {
	newOwners: { key: string; code: string; name: string }[];
	newAlloys: { key: string; code: string; name: string; family: AlloyFamily }[];
	creates: PlannedDie[];
	updates: PlannedUpdate[];
	tasks: PlannedTask[];
	/** Resolved ids of owners/alloys the register knows, by the sheet's text (lower case). */
	ownerIds: Map<string, number>;
	alloyIds: Map<string, number>;
}

/** The register columns the import reads and may change. */
type ExistingDie = Pick<
	Die,
	| 'id'
	| 'number'
	| 'part_name'
	| 'part_number'
	| 'customer_id'
	| 'alloy_id'
	| 'process'
	| 'cavities'
	| 'projected_area_cm2'
	| 'has_slides'
	| 'location'
	| 'notes'
	| 'expected_life_shots'
	| 'total_shots'
>;

const DAY = (d: string) => `${d}T00:00:00.000Z`;
const lower = (s: string) => s.trim().toLowerCase();

/** Register columns a mapped dies field changes in update mode. */
const UPDATE_COLUMNS: Record<string, keyof ExistingDie> = {
	part_name: 'part_name',
	part_number: 'part_number',
	owner: 'customer_id',
	alloy: 'alloy_id',
	process: 'process',
	cavities: 'cavities',
	projected_area_cm2: 'projected_area_cm2',
	has_slides: 'has_slides',
	location: 'location',
	notes: 'notes',
	expected_life_shots: 'expected_life_shots'
};
/** Fields that describe a die's start in Castellan: only when it is created. */
const CREATE_ONLY = [
	'opening_shots',
	'steel',
	'cover_serial',
	'cover_installed',
	'ejector_serial',
	'ejector_installed'
];
/** Die-form fields by import field, to put zod's messages on the right cell. */
const FORM_FIELD: Record<string, string> = {
	number: 'number',
	partName: 'part_name',
	partNumber: 'part_number',
	customerId: 'owner',
	alloyId: 'alloy',
	process: 'process',
	cavities: 'cavities',
	projectedAreaCm2: 'projected_area_cm2',
	hasSlides: 'has_slides',
	location: 'location',
	notes: 'notes',
	expectedLifeShots: 'expected_life_shots',
	coverSerial: 'cover_serial',
	ejectorSerial: 'ejector_serial',
	steel: 'steel'
};

function readProcess(text: string): DieProcess | null {
	const t = lower(text).replace(/[\s-]+/g, '_');
	if (t === 'hot_chamber' || t === 'hot') return 'hot_chamber';
	if (t === 'cold_chamber' || t === 'cold') return 'cold_chamber';
	return null;
}
function readYesNo(text: string): boolean | null {
	const t = lower(text);
	if (['yes', 'y', 'true', '1'].includes(t)) return true;
	if (['no', 'n', 'false', '0', ''].includes(t)) return false;
	return null;
}

/** Reads the lookups the analysis needs, all at once, from the database as it is now. */
async function loadRegister(s: SqlSession) {
	const customers = await s.all<{ id: number; code: string; name: string }>(
		'select id, code, name from customers'
	);
	const alloys = await s.all<{ id: number; code: string; name: string; family: AlloyFamily }>(
		'select id, code, name, family from alloys'
	);
	const dies = await s.all<ExistingDie>(
		`select id, number, part_name, part_number, customer_id, alloy_id, process, cavities,
		        projected_area_cm2, has_slides, location, notes, expected_life_shots, total_shots
		   from dies`
	);
	const serials = new Set(
		(await s.all<{ s: string }>('select upper(serial) as s from die_halves')).map((r) => r.s)
	);
	const templates = await s.all<{ family: AlloyFamily; kind: string }>(
		'select family, kind from service_templates'
	);
	const tasks = await s.all<{ die_id: number; kind: string }>(
		'select die_id, kind from service_tasks where active = 1'
	);
	const ownerByText = new Map<string, number>();
	for (const c of customers) {
		ownerByText.set(lower(c.name), c.id);
		ownerByText.set(lower(c.code), c.id);
	}
	const alloyByText = new Map<string, { id: number; family: AlloyFamily }>();
	for (const a of alloys) {
		alloyByText.set(lower(a.name), a);
		alloyByText.set(lower(a.code), a);
	}
	const familyKinds = new Map<AlloyFamily, Set<string>>();
	for (const t of templates) {
		if (!familyKinds.has(t.family)) familyKinds.set(t.family, new Set());
		familyKinds.get(t.family)!.add(t.kind);
	}
	const dieKinds = new Map<number, Set<string>>();
	for (const t of tasks) {
		if (!dieKinds.has(t.die_id)) dieKinds.set(t.die_id, new Set());
		dieKinds.get(t.die_id)!.add(t.kind);
	}
	return {
		customers: new Map(customers.map((c) => [c.id, c])),
		alloys: new Map(alloys.map((a) => [a.id, a])),
		ownerByText,
		alloyByText,
		dies: new Map(dies.map((d) => [d.number, d])),
		serials,
		familyKinds,
		dieKinds
	};
}

/** A sheet's cells by field, fixes applied; only mapped fields. */
function rowReader(payload: ImportPayload, kind: ImportKind, headers: string[]) {
	const mapping = payload.mapping[kind] ?? {};
	const columns = new Map<string, number>();
	for (const [field, header] of Object.entries(mapping)) {
		const at = headers.indexOf(header);
		if (header && at >= 0) columns.set(field, at);
	}
	// Fixes by row, read once: a lookup per cell on the payload's object costs seconds at 80 000 rows.
	const fixes = new Map<number, Map<string, string>>();
	for (const [key, value] of Object.entries(payload.fixes)) {
		const [k, i, field] = key.split(':');
		if (k !== kind) continue;
		if (!fixes.has(Number(i))) fixes.set(Number(i), new Map());
		fixes.get(Number(i))!.set(field, value);
	}
	return {
		mapped: (field: string) => columns.has(field),
		cell: (row: Cell[], index: number, field: string): Cell => {
			const fix = fixes.size ? fixes.get(index)?.get(field) : undefined;
			if (fix !== undefined) return fix;
			const at = columns.get(field);
			return at === undefined ? null : (row[at] ?? null);
		}
	};
}

const shown = (v: unknown) => (v === null || v === undefined || v === '' ? '' : String(v));

/**
 * Reads every row of an uploaded register against the database as it is now and says, per row,
 * what it would do and what stops it. The one judgement behind preview, dry run and commit: the
 * commit calls this again inside its transaction and writes exactly the plan it returns.
 */
export async function analyzeImport(
	session: SqlSession,
	payload: ImportPayload,
	now: string
): Promise<{ preview: ImportPreview; plan: ImportPlan }> {
	const reg = await loadRegister(session);
	const today = now.slice(0, 10);
	const skips = new Set(payload.skips);
	const mode = payload.mode;
	const fileProblems: string[] = [];
	const unknownOwners = new Set<string>();
	const unknownAlloys = new Set<string>();
	const plan: ImportPlan = {
		newOwners: [],
		newAlloys: [],
		creates: [],
		updates: [],
		tasks: [],
		ownerIds: new Map(),
		alloyIds: new Map()
	};
	const sheets: ImportPreview['sheets'] = [];

	// Owners and alloys: the register's own, or the user's choice for text it does not know.
	const newOwnerKeys = new Map<string, { code: string; name: string }>();
	const newAlloyKeys = new Map<string, { code: string; name: string; family: AlloyFamily }>();
	const resolveOwner = (text: string): { ok: true } | { ok: false; message: string } => {
		const key = lower(text);
		if (reg.ownerByText.has(key)) {
			plan.ownerIds.set(key, reg.ownerByText.get(key)!);
			return { ok: true };
		}
		const choice = payload.owners[key];
		if (choice && 'customerId' in choice && reg.customers.has(choice.customerId)) {
			plan.ownerIds.set(key, choice.customerId);
			return { ok: true };
		}
		if (choice && 'create' in choice) {
			newOwnerKeys.set(key, choice.create);
			return { ok: true };
		}
		unknownOwners.add(text.trim());
		return { ok: false, message: `Unknown owner "${text.trim()}": create it or pick one below.` };
	};
	const resolveAlloy = (
		text: string
	): { ok: true; family: AlloyFamily } | { ok: false; message: string } => {
		const key = lower(text);
		const known = reg.alloyByText.get(key);
		if (known) {
			plan.alloyIds.set(key, known.id);
			return { ok: true, family: known.family };
		}
		const choice = payload.alloys[key];
		if (choice && 'alloyId' in choice && reg.alloys.has(choice.alloyId)) {
			plan.alloyIds.set(key, choice.alloyId);
			return { ok: true, family: reg.alloys.get(choice.alloyId)!.family };
		}
		if (choice && 'create' in choice) {
			newAlloyKeys.set(key, choice.create);
			return { ok: true, family: choice.create.family };
		}
		unknownAlloys.add(text.trim());
		return { ok: false, message: `Unknown alloy "${text.trim()}": create it or pick one below.` };
	};

	const sheetOf = (kind: ImportKind) => payload.sheets.find((s) => s.kind === kind);
	let problemRows = 0;
	let skipped = 0;
	let unchanged = 0;
	const fileDies = new Map<string, PlannedDie>();
	// In create mode a die of the Dies sheet is never also an existing die for the other sheets.
	const numbersOnDiesSheet = new Set<string>();

	// ---- Dies ----
	const diesSheet = sheetOf('dies');
	if (diesSheet) {
		const r = rowReader(payload, 'dies', diesSheet.headers);
		if (!r.mapped('number'))
			fileProblems.push('Map the Die number column: rows are matched by it.');
		if (mode === 'create') {
			for (const f of IMPORT_FIELDS.dies) {
				if (f.required && !r.mapped(f.key)) fileProblems.push(`Map a column to ${f.label}.`);
			}
		} else {
			for (const key of CREATE_ONLY) {
				if (r.mapped(key)) {
					const label = IMPORT_FIELDS.dies.find((f) => f.key === key)!.label;
					fileProblems.push(
						`${label} is set when a die is created; leave it unmapped in update mode (counts go through the ledger, halves through Replace half).`
					);
				}
			}
		}
		const firstLine = new Map<string, number>();
		const rows: RowPreview[] = [];
		diesSheet.rows.forEach((row, index) => {
			const line = index + 2;
			const cells: Record<string, string> = {};
			for (const f of IMPORT_FIELDS.dies)
				if (r.mapped(f.key)) cells[f.key] = cellText(r.cell(row, index, f.key));
			if (skips.has(`dies:${index}`)) {
				skipped++;
				rows.push({ index, line, skipped: true, cells, problems: [], action: 'skip' });
				return;
			}
			const problems: RowProblem[] = [];
			const problem = (field: string, message: string) => problems.push({ field, message });
			const text = (key: string) => cellText(r.cell(row, index, key));
			const number = text('number').toUpperCase();
			if (number) {
				const first = firstLine.get(number);
				if (first !== undefined) problem('number', `Die ${number} is also on row ${first}.`);
				else firstLine.set(number, line);
			}
			const existing = number ? reg.dies.get(number) : undefined;
			if (number && mode === 'create') numbersOnDiesSheet.add(number);
			if (number && mode === 'create' && existing) {
				problem(
					'number',
					`Die ${number} is already in the register: use update mode, or skip this row.`
				);
			}
			if (number && mode === 'update' && !existing) {
				problem('number', `There is no die ${number} in the register to update.`);
			}

			// Typed values of the mapped cells, read strictly.
			const values: Record<string, unknown> = {};
			for (const f of IMPORT_FIELDS.dies) {
				if (!r.mapped(f.key) || f.key === 'number') continue;
				const c = r.cell(row, index, f.key);
				const t = cellText(c);
				if (t === '') {
					if (f.required) problem(f.key, `${f.label} is blank.`);
					values[f.key] = null;
					continue;
				}
				if (f.type === 'whole' || f.type === 'decimal') {
					const n = readImportNumber(c, f.type === 'whole');
					if (!n.ok) problem(f.key, n.message);
					else values[f.key] = n.value;
				} else if (f.type === 'date') {
					const d = readImportDate(c);
					if (!d.ok) problem(f.key, d.message);
					else if (d.value > today) problem(f.key, `${d.value} is in the future.`);
					else values[f.key] = d.value;
				} else if (f.type === 'process') {
					const p = readProcess(t);
					if (!p) problem(f.key, `"${t}" is not a process: write hot_chamber or cold_chamber.`);
					else values[f.key] = p;
				} else if (f.type === 'yesno') {
					const y = readYesNo(t);
					if (y === null) problem(f.key, `"${t}" is not yes or no.`);
					else values[f.key] = y;
				} else values[f.key] = t;
			}
			let family: AlloyFamily | null = null;
			if (typeof values.owner === 'string') {
				const o = resolveOwner(values.owner);
				if (!o.ok) problem('owner', o.message);
			}
			if (typeof values.alloy === 'string') {
				const a = resolveAlloy(values.alloy);
				if (!a.ok) problem('alloy', a.message);
				else family = a.family;
			}
			const opening = (values.opening_shots as number | null | undefined) ?? 0;
			if (opening < 0) problem('opening_shots', 'The opening count cannot be below 0.');
			if (opening > MAX_SHOTS_PER_ENTRY) {
				problem(
					'opening_shots',
					`${opening} shots is not plausible (at most ${MAX_SHOTS_PER_ENTRY}).`
				);
			}

			// The die form's own rules (lengths, ranges, number pattern): one judgement for form and import.
			const base = existing;
			const form = {
				number,
				partName: values.part_name ?? base?.part_name ?? '',
				partNumber:
					values.part_number ?? (r.mapped('part_number') ? '' : (base?.part_number ?? '')),
				customerId: 1,
				alloyId: 1,
				process: values.process ?? base?.process ?? 'cold_chamber',
				cavities: values.cavities ?? base?.cavities ?? 1,
				projectedAreaCm2: values.projected_area_cm2 ?? base?.projected_area_cm2 ?? 1,
				hasSlides: values.has_slides ?? (base ? base.has_slides === 1 : false),
				location: values.location ?? (r.mapped('location') ? '' : (base?.location ?? '')),
				notes: values.notes ?? (r.mapped('notes') ? '' : (base?.notes ?? '')),
				expectedLifeShots:
					values.expected_life_shots ??
					(r.mapped('expected_life_shots') ? undefined : (base?.expected_life_shots ?? undefined)),
				coverSerial: (values.cover_serial as string | undefined) ?? undefined,
				ejectorSerial: (values.ejector_serial as string | undefined) ?? undefined,
				steel: (values.steel as string | null) || 'H13'
			};
			const parsed = dieFormSchema.safeParse(form);
			if (!parsed.success) {
				for (const issue of parsed.error.issues) {
					const field = FORM_FIELD[String(issue.path[0])] ?? 'number';
					if (!problems.some((p) => p.field === field)) problem(field, issue.message);
				}
			}
			if (!number && !problems.some((p) => p.field === 'number'))
				problem('number', 'Die number is blank.');

			let action: RowPreview['action'] = 'problem';
			let changes: RowPreview['changes'];
			if (!problems.length && parsed.success) {
				if (mode === 'create') {
					const die: PlannedDie = {
						line,
						form: parsed.data,
						ownerKey: lower(values.owner as string),
						alloyKey: lower(values.alloy as string),
						family: family!,
						opening,
						halves: []
					};
					for (const side of ['cover', 'ejector'] as const) {
						const serial = (values[`${side}_serial`] as string | null) ?? null;
						const installed = (values[`${side}_installed`] as string | null) ?? null;
						die.halves.push({
							side,
							serial: (serial || `${number}-${side === 'cover' ? 'C' : 'E'}1`).toUpperCase(),
							steel: parsed.data.steel,
							hardnessHrc: null,
							installedAt: installed ? DAY(installed) : now,
							removedAt: null,
							removalReason: null,
							shots: opening
						});
					}
					fileDies.set(number, die);
					plan.creates.push(die);
					action = 'create';
				} else {
					const set: PlannedUpdate['set'] = {};
					changes = [];
					for (const [field, column] of Object.entries(UPDATE_COLUMNS)) {
						if (!r.mapped(field)) continue;
						let from: unknown = existing![column];
						let toShown: string;
						let fromShown: string;
						if (field === 'owner') {
							const id = plan.ownerIds.get(lower(values.owner as string));
							toShown = values.owner as string;
							fromShown = reg.customers.get(existing!.customer_id)?.code ?? '';
							if (id === undefined || id !== from) {
								set.__owner = lower(values.owner as string);
								changes.push({ field, from: fromShown, to: toShown });
							}
							continue;
						}
						if (field === 'alloy') {
							const id = plan.alloyIds.get(lower(values.alloy as string));
							toShown = values.alloy as string;
							fromShown = reg.alloys.get(existing!.alloy_id)?.code ?? '';
							if (id === undefined || id !== from) {
								set.__alloy = lower(values.alloy as string);
								changes.push({ field, from: fromShown, to: toShown });
							}
							continue;
						}
						const v = values[field];
						const to =
							v === undefined || v === null || v === ''
								? null
								: typeof v === 'boolean'
									? v
										? 1
										: 0
									: (v as string | number);
						if (field === 'part_name' && to === null) continue;
						if (from === undefined) from = null;
						if (to !== from) {
							set[column] = to;
							changes.push({ field, from: shown(from), to: shown(to) });
						}
					}
					if (changes.length) {
						plan.updates.push({ dieId: existing!.id, number, set, changes });
						action = 'update';
					} else {
						unchanged++;
						action = 'unchanged';
					}
				}
			} else problemRows++;
			rows.push({ index, line, skipped: false, cells, problems, action, changes });
		});
		sheets.push({ kind: 'dies', name: diesSheet.name, rows });
	}

	// ---- Halves (new dies only) ----
	const halvesSheet = sheetOf('halves');
	if (halvesSheet) {
		const r = rowReader(payload, 'halves', halvesSheet.headers);
		for (const f of IMPORT_FIELDS.halves) {
			if (f.required && !r.mapped(f.key))
				fileProblems.push(`Halves sheet: map a column to ${f.label}.`);
		}
		const rows: RowPreview[] = [];
		const fromSheet = new Map<string, PlannedHalf[]>();
		const rowOfHalf = new Map<PlannedHalf, RowPreview>();
		halvesSheet.rows.forEach((row, index) => {
			const line = index + 2;
			const cells: Record<string, string> = {};
			for (const f of IMPORT_FIELDS.halves)
				if (r.mapped(f.key)) cells[f.key] = cellText(r.cell(row, index, f.key));
			if (skips.has(`halves:${index}`)) {
				skipped++;
				rows.push({ index, line, skipped: true, cells, problems: [], action: 'skip' });
				return;
			}
			const problems: RowProblem[] = [];
			const problem = (field: string, message: string) => problems.push({ field, message });
			const number = cells.die?.toUpperCase() ?? '';
			const die = fileDies.get(number);
			if (!number) problem('die', 'Die number is blank.');
			else if (!die) {
				problem(
					'die',
					reg.dies.has(number)
						? `Die ${number} is already registered: change its halves on the die page (Replace half).`
						: `Die ${number} is not a new die on the Dies sheet (or its row has problems).`
				);
			}
			const side = lower(cells.side ?? '');
			if (side !== 'cover' && side !== 'ejector') problem('side', 'Side must be cover or ejector.');
			const serial = (cells.serial ?? '').toUpperCase();
			if (!serial) problem('serial', 'Serial is blank.');
			else if (serial.length > 40) problem('serial', 'Keep the serial under 40 characters.');
			let hrc: number | null = null;
			if (cells.hardness_hrc) {
				const n = readImportNumber(r.cell(row, index, 'hardness_hrc'), false);
				if (!n.ok) problem('hardness_hrc', n.message);
				else if (n.value < 20 || n.value > 70)
					problem('hardness_hrc', 'Hardness must be 20 to 70 HRC.');
				else hrc = n.value;
			}
			const date = (field: string) => {
				if (!cells[field]) return null;
				const d = readImportDate(r.cell(row, index, field));
				if (!d.ok) return (problem(field, d.message), null);
				if (d.value > today) return (problem(field, `${d.value} is in the future.`), null);
				return d.value;
			};
			const installed = date('installed');
			if (!cells.installed) problem('installed', 'Installed is blank.');
			const removed = date('removed');
			if (installed && removed && removed < installed)
				problem('removed', 'Removed is before installed.');
			let shots: number | null = null;
			if (cells.half_shots) {
				const n = readImportNumber(r.cell(row, index, 'half_shots'), true);
				if (!n.ok) problem('half_shots', n.message);
				else if (n.value < 0) problem('half_shots', 'Shots cannot be below 0.');
				else shots = n.value;
			}
			if (die && !removed && shots !== null && shots > die.opening) {
				problem(
					'half_shots',
					`A half in the die now cannot have more shots (${shots}) than the die's opening count (${die.opening}).`
				);
			}
			const preview: RowPreview = {
				index,
				line,
				skipped: false,
				cells,
				problems,
				action: 'problem'
			};
			rows.push(preview);
			if (problems.length || !die) {
				problemRows++;
				return;
			}
			const half: PlannedHalf = {
				side: side as HalfSide,
				serial,
				steel: cells.steel || die.form.steel,
				hardnessHrc: hrc,
				installedAt: DAY(installed!),
				removedAt: removed ? DAY(removed) : null,
				removalReason: cells.removal_reason || null,
				shots: shots ?? (removed ? 0 : die.opening)
			};
			if (!fromSheet.has(number)) fromSheet.set(number, []);
			fromSheet.get(number)!.push(half);
			rowOfHalf.set(half, preview);
			preview.action = 'create';
		});
		// A die listed on the Halves sheet takes its halves from there; one current half per side.
		for (const [number, list] of fromSheet) {
			const die = fileDies.get(number)!;
			for (const side of ['cover', 'ejector'] as const) {
				const current = list.filter((h) => h.side === side && !h.removedAt);
				if (current.length > 1) {
					for (const h of current.slice(1)) {
						const p = rowOfHalf.get(h)!;
						p.problems.push({
							field: 'removed',
							message: `Die ${number} already has a current ${side} half on row ${rowOfHalf.get(current[0])!.line}; give this one a removed date.`
						});
						p.action = 'problem';
						problemRows++;
					}
				}
				const listed = list.filter((h) => h.side === side);
				if (current.length === 0 && listed.length) {
					for (const h of listed) {
						const p = rowOfHalf.get(h)!;
						if (p.action === 'problem') continue;
						p.problems.push({
							field: 'removed',
							message: `Die ${number} has no current ${side} half on this sheet (every ${side} half has a removed date).`
						});
						p.action = 'problem';
						problemRows++;
					}
				}
				if (listed.length) die.halves = [...die.halves.filter((h) => h.side !== side), ...listed];
			}
		}
		sheets.push({ kind: 'halves', name: halvesSheet.name, rows });
	}

	// Serials: unique in the file and against the register.
	const serialLine = new Map<string, string>();
	for (const die of plan.creates) {
		for (const h of die.halves) {
			const where = `die ${die.form.number}`;
			const clash = reg.serials.has(h.serial)
				? `Serial ${h.serial} is already on record in the register.`
				: serialLine.has(h.serial)
					? `Serial ${h.serial} is also used for ${serialLine.get(h.serial)}.`
					: null;
			serialLine.set(h.serial, where);
			if (clash) {
				const row = sheets[0]?.rows.find((p) => p.line === die.line);
				if (row && row.action !== 'problem') {
					row.problems.push({
						field: h.side === 'cover' ? 'cover_serial' : 'ejector_serial',
						message: clash
					});
					row.action = 'problem';
					problemRows++;
				}
			}
		}
	}
	const halvesCount = plan.creates.reduce((n, d) => n + d.halves.length, 0);

	// ---- Service tasks ----
	const serviceSheet = sheetOf('service');
	if (serviceSheet) {
		const r = rowReader(payload, 'service', serviceSheet.headers);
		for (const f of IMPORT_FIELDS.service) {
			if (f.required && !r.mapped(f.key))
				fileProblems.push(`Service sheet: map a column to ${f.label}.`);
		}
		const rows: RowPreview[] = [];
		const seen = new Map<string, number>();
		serviceSheet.rows.forEach((row, index) => {
			const line = index + 2;
			const cells: Record<string, string> = {};
			for (const f of IMPORT_FIELDS.service)
				if (r.mapped(f.key)) cells[f.key] = cellText(r.cell(row, index, f.key));
			if (skips.has(`service:${index}`)) {
				skipped++;
				rows.push({ index, line, skipped: true, cells, problems: [], action: 'skip' });
				return;
			}
			const problems: RowProblem[] = [];
			const problem = (field: string, message: string) => problems.push({ field, message });
			const number = (cells.die ?? '').toUpperCase();
			const kind = lower(cells.task ?? '').replace(/\s+/g, '_');
			const planned = fileDies.get(number);
			const existing = reg.dies.get(number);
			let total = 0;
			let kinds: Set<string> | undefined;
			if (!number) problem('die', 'Die number is blank.');
			else if (planned) {
				total = planned.opening;
				kinds = reg.familyKinds.get(planned.family);
			} else if (existing && !numbersOnDiesSheet.has(number)) {
				total = existing.total_shots;
				kinds = reg.dieKinds.get(existing.id);
			} else
				problem(
					'die',
					`Die ${number} is neither a new die of this file nor in the register (or its row has problems).`
				);
			if (!kind) problem('task', 'Task is blank.');
			const key = `${number}|${kind}`;
			if (seen.has(key))
				problem('task', `Task ${kind} of die ${number} is also on row ${seen.get(key)}.`);
			else seen.set(key, line);
			let lastDone: string | null = null;
			if (!cells.last_done) problem('last_done', 'Last done is blank.');
			else {
				const d = readImportDate(r.cell(row, index, 'last_done'));
				if (!d.ok) problem('last_done', d.message);
				else if (d.value > today) problem('last_done', `${d.value} is in the future.`);
				else lastDone = d.value;
			}
			const whole = (field: string, min: number) => {
				if (!cells[field]) return undefined;
				const n = readImportNumber(r.cell(row, index, field), true);
				if (!n.ok) return (problem(field, n.message), undefined);
				if (n.value < min) return (problem(field, `Must be ${min} or more.`), undefined);
				return n.value;
			};
			const lastShots = whole('last_done_shots', 0) ?? 0;
			if (lastShots > total && !problems.some((p) => p.field === 'die')) {
				problem('last_done_shots', `${lastShots} is above the die's count (${total}).`);
			}
			const intervalShots = whole('interval_shots', 1);
			const intervalDays = whole('interval_days', 1);
			if (
				kind &&
				kinds &&
				!kinds.has(kind) &&
				intervalShots === undefined &&
				intervalDays === undefined
			) {
				problem(
					'task',
					`Die ${number} has no ${kind} task in its plan; give an interval (shots or days) to add it.`
				);
			}
			if (!problems.length) {
				plan.tasks.push({
					dieNumber: number,
					kind,
					lastDoneAt: DAY(lastDone!),
					lastDoneShots: lastShots,
					intervalShots,
					intervalDays
				});
				rows.push({
					index,
					line,
					skipped: false,
					cells,
					problems,
					action: planned ? 'create' : 'update'
				});
			} else {
				problemRows++;
				rows.push({ index, line, skipped: false, cells, problems, action: 'problem' });
			}
		});
		sheets.push({ kind: 'service', name: serviceSheet.name, rows });
	}
	if (!payload.sheets.length) fileProblems.push('The file holds no sheet to import.');

	for (const [key, o] of newOwnerKeys) plan.newOwners.push({ key, ...o });
	for (const [key, a] of newAlloyKeys) plan.newAlloys.push({ key, ...a });
	const rowsTotal = sheets.reduce((n, s) => n + s.rows.length, 0);
	const preview: ImportPreview = {
		mode,
		sheets,
		fileProblems,
		unknownOwners: [...unknownOwners].sort(),
		unknownAlloys: [...unknownAlloys].sort(),
		counts: {
			rows: rowsTotal,
			problemRows,
			skipped,
			create: plan.creates.length,
			update: plan.updates.length,
			unchanged,
			halves: halvesCount,
			tasks: plan.tasks.length,
			openingShots: plan.creates.reduce((n, d) => n + d.opening, 0),
			newOwners: plan.newOwners.length,
			newAlloys: plan.newAlloys.length
		},
		ready: false
	};
	preview.ready =
		fileProblems.length === 0 &&
		problemRows === 0 &&
		unknownOwners.size === 0 &&
		unknownAlloys.size === 0 &&
		plan.creates.length + plan.updates.length + plan.tasks.length > 0;
	return { preview, plan };
}

/** Default expected life of an alloy created from the import, by family. */
export const newAlloyLife = (family: AlloyFamily) => DEFAULT_EXPECTED_LIFE_BY_FAMILY[family];
