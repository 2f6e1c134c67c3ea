// The demo plant: an invented scenario. Every company, person, part and number here is made up
// for the demo; none describes a real business.
import { sql } from 'kysely';
import type { DB } from '../../src/lib/server/db/connect';
import { recordOpeningBalance } from '../../src/lib/server/shots/opening-balance';
import type { AlloyFamily, DieProcess, DieStatus } from '../../src/lib/domain';
import { recordShots, type ShotInput } from '../../src/lib/server/shots/ledger';
import { setPlantZone } from '../../src/lib/plant-time';
import { createUser } from '../../src/lib/server/users/users';
import { createApiToken } from '../../src/lib/server/auth/tokens';
import { seedScheduleDemo } from './demo-schedule';
import { seedDemoShots } from './demo-shots';
import { seedToolroomDemo } from './demo-toolroom';
import { photoStoreFromEnv, type PhotoStore } from '../../src/lib/server/photos/photo-store';
import { RETIREMENT_REASONS, type RetirementReason } from '../../src/lib/domain';
import { engineOf } from '../../src/lib/server/db/connect';

const DEMO_RETIREMENT_ORDER: RetirementReason[] = [
	'worn_out',
	'cracked',
	'obsolete',
	'worn_out',
	'damaged',
	...RETIREMENT_REASONS.filter((r) => r === 'transferred' || r === 'recalled')
];

const DEMO_RETIREMENT_NOTES: Record<RetirementReason, string> = {
	worn_out: 'Heat checking over the whole cavity; owner approved a replacement die',
	cracked: 'Gross crack through the cover insert; beyond weld repair',
	damaged: 'Die closed on a stuck casting; ejector half broken',
	obsolete: 'Customer ended the part; die kept on the rack',
	transferred: 'Moved to the sister plant with the part',
	recalled: 'Owner took the tool back'
};

export const DEMO_PASSWORD = 'castellan-demo';
export const DEMO_PLANT = 'Kestrel Vale Diecast Works';
/** The demo plant runs on Central European time, so plant days are not UTC days. */
export const DEMO_PLANT_ZONE = 'Europe/Vienna';

export const DEMO_USERS = [
	{ email: 'admin@kestrelvale.test', name: 'Ines Marwood', role: 'admin', customer: null },
	{ email: 'lead@kestrelvale.test', name: 'Tomasz Ferrell', role: 'toolroom_lead', customer: null },
	{
		email: 'toolmaker@kestrelvale.test',
		name: 'Ruth Okonkwo-Hale',
		role: 'toolmaker',
		customer: null
	},
	{ email: 'planner@kestrelvale.test', name: 'Dev Castellanos', role: 'scheduler', customer: null },
	{ email: 'buyer@brookmere.test', name: 'Greta Pohl', role: 'customer', customer: 'BRKPUMP' },
	{ email: 'buyer@lumenfold.test', name: 'Amos Trevanion', role: 'customer', customer: 'LUMEN' }
] as const;

const CUSTOMERS = [
	{ code: 'BRKPUMP', name: 'Brookmere Pumps', contact_email: 'tooling@brookmere.test' },
	{ code: 'LUMEN', name: 'Lumenfold Lighting', contact_email: 'purchasing@lumenfold.test' },
	{ code: 'TOLLARD', name: 'Tollard Hand Tools', contact_email: 'buyers@tollard.test' },
	{ code: 'ASHENG', name: 'Ashcombe Small Engines', contact_email: 'supply@ashcombe.test' }
];

// kN for the tonnage class: 1 tf = 9.80665 kN.
const MACHINES = [
	{
		name: 'HC-08',
		chamber: 'hot',
		clamp_force_kn: 785,
		max_shot_weight_kg: 0.6,
		tie_bar_spacing_mm: 280
	},
	{
		name: 'HC-20',
		chamber: 'hot',
		clamp_force_kn: 1961,
		max_shot_weight_kg: 1.5,
		tie_bar_spacing_mm: 360
	},
	{
		name: 'HC-42M',
		chamber: 'hot',
		clamp_force_kn: 4119,
		max_shot_weight_kg: 2.2,
		tie_bar_spacing_mm: 520
	},
	{
		name: 'CC-40',
		chamber: 'cold',
		clamp_force_kn: 3923,
		max_shot_weight_kg: 4,
		tie_bar_spacing_mm: 510
	},
	{
		name: 'CC-84',
		chamber: 'cold',
		clamp_force_kn: 8238,
		max_shot_weight_kg: 9,
		tie_bar_spacing_mm: 760
	},
	{
		name: 'CC-160',
		chamber: 'cold',
		clamp_force_kn: 15691,
		max_shot_weight_kg: 22,
		tie_bar_spacing_mm: 1100
	},
	{
		name: 'CC-25B',
		chamber: 'cold',
		clamp_force_kn: 2452,
		max_shot_weight_kg: 3,
		tie_bar_spacing_mm: 420
	}
] as const;

interface DieSpec {
	part: string;
	customer: string;
	alloy: string;
	family: AlloyFamily;
	process: DieProcess;
	cavities: number;
	area: number;
	slides: boolean;
	press: string;
}

const PARTS: Record<string, string[]> = {
	BRKPUMP: [
		'Impeller housing',
		'Volute cover',
		'Bearing bracket',
		'Seal carrier',
		'Pump foot',
		'Priming cap',
		'Motor adapter',
		'Check-valve body',
		'Manifold block',
		'Terminal box lid',
		'Diffuser plate'
	],
	LUMEN: [
		'Spotlight heat sink',
		'Track adapter shell',
		'Lens bezel',
		'Driver housing',
		'Pendant canopy',
		'Wall-wash reflector frame',
		'Gimbal ring',
		'Street-lamp end cap',
		'Bollard cap',
		'LED module base',
		'Clamp knuckle'
	],
	TOLLARD: [
		'Pipe wrench jaw',
		'Plier handle core',
		'Hammer head blank',
		'Ratchet cap',
		'Clamp frame',
		'Vice slide',
		'Spirit-level body',
		'Tape-measure case',
		'Socket tray',
		'Valve key',
		'Brass tap handle'
	],
	ASHENG: [
		'Crankcase half',
		'Cylinder head cover',
		'Carburettor body',
		'Starter housing',
		'Flywheel fan',
		'Oil-sump cover',
		'Throttle lever',
		'Air-filter base',
		'Gear cover',
		'Brass fuel fitting',
		'Magneto bracket'
	]
};

const ALLOY_CYCLE: {
	alloy: string;
	family: AlloyFamily;
	process: DieProcess;
	press: string;
	area: [number, number];
}[] = [
	{ alloy: 'ZP0400', family: 'zinc', process: 'hot_chamber', press: 'HC-08', area: [40, 140] },
	{ alloy: 'A380', family: 'aluminium', process: 'cold_chamber', press: 'CC-84', area: [300, 900] },
	{ alloy: 'ZP0410', family: 'zinc', process: 'hot_chamber', press: 'HC-20', area: [80, 300] },
	{
		alloy: 'AZ91D',
		family: 'magnesium',
		process: 'hot_chamber',
		press: 'HC-42M',
		area: [150, 500]
	},
	{
		alloy: 'EN-AC-46000',
		family: 'aluminium',
		process: 'cold_chamber',
		press: 'CC-160',
		area: [900, 1800]
	},
	{ alloy: 'A380', family: 'aluminium', process: 'cold_chamber', press: 'CC-40', area: [150, 420] },
	{ alloy: 'CW617N', family: 'copper', process: 'cold_chamber', press: 'CC-25B', area: [40, 160] }
];

/** Deterministic pseudo-random numbers so every demo database tells the same story. */
function mulberry32(seed: number) {
	return () => {
		seed |= 0;
		seed = (seed + 0x6d2b79f5) | 0;
		let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
		t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

const DAY = 86_400_000;
const HISTORY_DAYS = 548;

export async function isEmpty(db: DB): Promise<boolean> {
	const row = await db
		.selectFrom('users')
		.select((eb) => eb.fn.countAll<number>().as('n'))
		.executeTakeFirstOrThrow();
	return Number(row.n) === 0;
}

export interface SeedSummary {
	dies: number;
	entries: number;
	token: string;
}

/** Fills an empty, migrated database with the demo plant. */
export async function seedDemo(
	db: DB,
	now = new Date(),
	photoStore: PhotoStore = photoStoreFromEnv(process.env)
): Promise<SeedSummary> {
	const rand = mulberry32(20261201);
	const nowIso = now.toISOString();
	// Set before any shot is counted, so the roll-up is keyed by Vienna days from the start.
	await db
		.updateTable('plant_settings')
		.set({
			time_zone: DEMO_PLANT_ZONE,
			// An invented plant: every name, address and number here is made up.
			plant_name: 'Greywater Die Casting',
			plant_address: 'Unit 7, Anvil Park\nGreywater',
			contact_email: 'tooling@greywater.example',
			contact_phone: '+43 1 000 0000',
			statement_footer: 'Greywater Die Casting · tooling desk · figures are planning aids',
			repair_rate_per_hour: 68,
			currency: 'EUR',
			updated_at: nowIso
		})
		.where('id', '=', 1)
		.execute();
	setPlantZone(DEMO_PLANT_ZONE);
	await db.insertInto('customers').values(CUSTOMERS).execute();
	await db
		.insertInto('machines')
		.values(MACHINES.map((m) => ({ ...m })))
		.execute();
	const customers = new Map(
		(await db.selectFrom('customers').select(['id', 'code']).execute()).map((c) => [c.code, c.id])
	);
	const alloys = new Map(
		(await db.selectFrom('alloys').select(['id', 'code', 'expected_life_shots']).execute()).map(
			(a) => [a.code, a]
		)
	);
	for (const u of DEMO_USERS) {
		await createUser(db, {
			email: u.email,
			name: u.name,
			role: u.role,
			customerId: u.customer ? customers.get(u.customer)! : null,
			password: DEMO_PASSWORD
		});
	}
	const admin = await db
		.selectFrom('users')
		.select('id')
		.where('role', '=', 'admin')
		.executeTakeFirstOrThrow();

	// 44 dies: eleven parts per customer, alloys cycling through the plant's mix.
	const specs: DieSpec[] = [];
	let i = 0;
	for (const c of CUSTOMERS) {
		for (const part of PARTS[c.code]) {
			const a = part.startsWith('Brass') ? ALLOY_CYCLE[6] : ALLOY_CYCLE[i % 6];
			const [lo, hi] = a.area;
			specs.push({
				part,
				customer: c.code,
				alloy: a.alloy,
				family: a.family,
				process: a.process,
				cavities: a.family === 'zinc' ? 1 + Math.floor(rand() * 4) : 1 + Math.floor(rand() * 2),
				area: Math.round(lo + rand() * (hi - lo)),
				slides: rand() < 0.4,
				press: a.press
			});
			i++;
		}
	}

	let entries = 0;
	let retiredSoFar = 0;
	for (const [n, spec] of specs.entries()) {
		const number = `D-${String(101 + n).padStart(4, '0')}`;
		const alloy = alloys.get(spec.alloy)!;
		const life = alloy.expected_life_shots;
		// Some dies retired during the window: their life at retirement scatters around the
		// expected life, which gives the fleet statistics failures to fit.
		const retired = n % 9 === 4;
		const lifeFraction = retired
			? 0.7 + rand() * 0.6
			: n % 11 === 3
				? 0.9 + rand() * 0.08
				: 0.08 + rand() * 0.78;
		const startDay = Math.floor(rand() * 120);
		const endDay = retired ? HISTORY_DAYS - 60 - Math.floor(rand() * 200) : HISTORY_DAYS;
		const opening = Math.round(life * lifeFraction * (0.2 + rand() * 0.4));
		const target = Math.round(life * lifeFraction) - opening;
		const started = new Date(now.getTime() - (HISTORY_DAYS - startDay) * DAY);
		const createdAt = started.toISOString();
		const status: DieStatus = retired
			? 'retired'
			: n % 13 === 5
				? 'in_toolroom'
				: n % 17 === 8
					? 'held'
					: n % 3 === 0
						? 'running'
						: 'ready';

		const die = await db
			.insertInto('dies')
			.values({
				number,
				part_name: spec.part,
				part_number: `${spec.customer.slice(0, 3)}-${4000 + n * 7}`,
				customer_id: customers.get(spec.customer)!,
				alloy_id: alloy.id,
				process: spec.process,
				cavities: spec.cavities,
				projected_area_cm2: spec.area,
				has_slides: spec.slides ? 1 : 0,
				// Some cold-chamber aluminium dies record their own, higher intensification pressure
				// (invented process sheets); the rest use the family default.
				metal_pressure_bar:
					spec.family === 'aluminium' && spec.process === 'cold_chamber' && n % 4 === 1
						? 1000 + 50 * (n % 3)
						: null,
				status: 'ready',
				location: `Rack ${'ABCDEF'[n % 6]}-${1 + (n % 8)}`,
				notes: null,
				created_at: createdAt,
				updated_at: createdAt
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		for (const side of ['cover', 'ejector'] as const) {
			await db
				.insertInto('die_halves')
				.values({
					die_id: die.id,
					side,
					serial: `${number}-${side === 'cover' ? 'C' : 'E'}1`,
					steel: 'H13',
					hardness_hrc: 44 + Math.round(rand() * 4),
					installed_at: createdAt
				})
				.execute();
		}

		// The shots made before Castellan come in as an opening balance (not a day's production),
		// so shots-by-month and statements show them as the balance brought forward.
		await recordOpeningBalance(db, {
			dieId: die.id,
			shots: opening,
			at: createdAt,
			userId: null,
			note: 'Opening balance carried over from the previous register'
		});
		// Daily counter readings on working days, at the end of the second shift.
		const rows: ShotInput[] = [];
		const workDays: Date[] = [];
		for (let d = startDay + 1; d < endDay; d++) {
			const day = new Date(now.getTime() - (HISTORY_DAYS - d) * DAY);
			if (day.getUTCDay() !== 0 && rand() > 0.25) workDays.push(day);
		}
		const perDay = target / Math.max(1, workDays.length);
		for (const day of workDays) {
			// End of the late shift: 22:00 in Vienna in winter, 23:00 in summer — the same plant day.
			day.setUTCHours(21, 0, 0, 0);
			if (day.getTime() > now.getTime()) continue;
			const shots = Math.max(1, Math.round(perDay * (0.6 + rand() * 0.8)));
			rows.push({
				die: number,
				shots,
				countedAt: day.toISOString(),
				machine: spec.press,
				key: `demo-${number}-${day.toISOString().slice(0, 10)}`
			});
		}
		for (let k = 0; k < rows.length; k += 2000) {
			const result = await recordShots(
				db,
				rows.slice(k, k + 2000),
				{ userId: null, tokenId: null, customerId: null },
				{ source: 'seed', now: nowIso }
			);
			if (!result.ok)
				throw new Error(
					`Demo ledger for ${number} refused: ${JSON.stringify(result.issues.slice(0, 3))}`
				);
			entries += result.accepted;
		}

		// Service plan from the family template, last done at a point that spreads the tasks over
		// every due band.
		const total = (
			await db
				.selectFrom('dies')
				.select('total_shots')
				.where('id', '=', die.id)
				.executeTakeFirstOrThrow()
		).total_shots;
		const templates = await db
			.selectFrom('service_templates')
			.selectAll()
			.where('family', '=', spec.family)
			// The order SQLite's (family, kind) index gives: the random draws below must fall the
			// same way on PostgreSQL, which has no order without ORDER BY.
			.orderBy('kind')
			.execute();
		for (const t of templates) {
			const fraction = n % 5 === 1 ? 0.92 + rand() * 0.25 : rand() * 0.85;
			const shotsSince = t.interval_shots
				? Math.min(total, Math.round(t.interval_shots * fraction))
				: 0;
			const daysSince = t.interval_days
				? Math.round(t.interval_days * fraction)
				: Math.round(20 + rand() * 60);
			await db
				.insertInto('service_tasks')
				.values({
					die_id: die.id,
					kind: t.kind,
					interval_shots: t.interval_shots,
					interval_days: t.interval_days,
					last_done_shots: total - shotsSince,
					last_done_at: new Date(now.getTime() - daysSince * DAY).toISOString()
				})
				.execute();
		}
		// Retirements of both groups: wear failures (worn out, cracked) and suspensions (obsolete
		// part, accident), keeping three failures so the aluminium fleet still has a fit.
		const retirementReason = retired
			? DEMO_RETIREMENT_ORDER[retiredSoFar++ % DEMO_RETIREMENT_ORDER.length]
			: null;
		if (status !== 'ready') {
			const at = retired
				? new Date(now.getTime() - (HISTORY_DAYS - endDay) * DAY).toISOString()
				: nowIso;
			await db
				.updateTable('dies')
				.set({ status, retired_at: retired ? at : null, retirement_reason: retirementReason })
				.where('id', '=', die.id)
				.execute();
			await db
				.insertInto('audit_log')
				.values({
					at,
					user_id: admin.id,
					action: 'die.status',
					die_id: die.id,
					detail: JSON.stringify({
						from: 'ready',
						to: status,
						reason: retirementReason
							? DEMO_RETIREMENT_NOTES[retirementReason]
							: status === 'held'
								? 'Porosity complaint from the customer; awaiting decision'
								: status === 'in_toolroom'
									? 'Scheduled service'
									: 'Production order'
					})
				})
				.execute();
		}
	}
	const { token } = await createApiToken(db, {
		name: 'Demo press-counter gateway',
		scopes: ['shots:write', 'dies:read'],
		customerId: null,
		createdBy: admin.id
	});
	// The toolroom's jobs, inspections (with drawn surface images) and cooling checks, then the
	// planner's bookings for the coming weeks.
	await seedDemoShots(db, now);
	await seedToolroomDemo(db, now, photoStore);
	await seedScheduleDemo(db, now);
	// SQLite's planner statistics after the bulk load; PostgreSQL's autovacuum analyses on its own.
	if (engineOf(db) === 'sqlite') await sql`pragma optimize`.execute(db);
	return { dies: specs.length, entries, token };
}
