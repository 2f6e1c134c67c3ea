// Toolroom part of the invented demo plant: open and closed jobs, surface inspections with
// procedurally drawn heat-check images (no real photos), cooling circuits with checks — one weak
// circuit on D-0120 — and rising surface grades on D-0131. Die states set by the scenario are left
// as they are, and no service task is marked done, so the rest of the demo tells the same story.
import { createJimp } from '@jimp/core';
import jpeg from '@jimp/js-jpeg';
import type { DB } from '../../src/lib/server/db/connect';
import { photoStoreFromEnv, type PhotoStore } from '../../src/lib/server/photos/photo-store';
import { closePhotoPool } from '../../src/lib/server/photos/worker-pool';
import {
	closeJobSchema,
	coolingCheckSchema,
	type OpenJobForm
} from '../../src/lib/schemas/toolroom';
import { addCircuit, recordCheck } from '../../src/lib/server/toolroom/cooling';
import { recordInspection } from '../../src/lib/server/toolroom/inspections';
import { addDieZone, findDieZone, recordJobRepairs } from '../../src/lib/server/toolroom/zones';
import { closeJob, moveJob, openJob, type Actor } from '../../src/lib/server/toolroom/jobs';
import { setPhotoShared, uploadPhotos } from '../../src/lib/server/toolroom/photos';
import { askOwnerDecision } from '../../src/lib/server/owner/decisions';

const Jimp = createJimp({ formats: [jpeg] });
const DAY = 86_400_000;

function mulberry32(seed: number) {
	return () => {
		seed |= 0;
		seed = (seed + 0x6d2b79f5) | 0;
		let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
		t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

/**
 * A die-steel surface drawn from numbers: ground finish with faint machining marks, and a
 * heat-check network whose density, length and darkness grow with the surface grade.
 */
export async function drawSurfaceImage(seed: number, grade: number): Promise<Buffer> {
	// Small on purpose: ten of these go through the photo pipeline on every demo seed.
	const width = 512;
	const height = 384;
	const rand = mulberry32(seed);
	const shade = new Float32Array(width * height);
	for (let y = 0; y < height; y++) {
		for (let x = 0; x < width; x++) {
			const marks = y % 6 === 0 ? -7 : 0;
			shade[y * width + x] = 150 + 18 * Math.sin((x + y * 0.3) / 90) + marks + (rand() - 0.5) * 14;
		}
	}
	const darken = (x: number, y: number, amount: number) => {
		const xi = Math.round(x);
		const yi = Math.round(y);
		if (xi < 0 || yi < 0 || xi >= width || yi >= height) return;
		shade[yi * width + xi] = Math.min(shade[yi * width + xi], 150 - amount);
	};
	const cracks = [0, 5, 16, 34, 50][grade] ?? 0;
	const queue: { x: number; y: number; angle: number; length: number; depth: number }[] = [];
	for (let i = 0; i < cracks; i++) {
		queue.push({
			x: 80 + rand() * (width - 160),
			y: 60 + rand() * (height - 120),
			angle: rand() * Math.PI * 2,
			length: 25 + rand() * (30 + grade * 35),
			depth: 45 + grade * 18
		});
	}
	if (grade >= 4) {
		queue.push({ x: 40, y: height / 2, angle: 0.1, length: width - 80, depth: 140 });
	}
	let drawn = 0;
	while (queue.length && drawn < 400) {
		const c = queue.pop()!;
		drawn++;
		let { x, y, angle } = c;
		const thick = c.depth > 110 ? 2 : grade >= 3 ? 1 : 0;
		for (let s = 0; s < c.length; s++) {
			angle += (rand() - 0.5) * 0.5;
			x += Math.cos(angle);
			y += Math.sin(angle);
			for (let t = -thick; t <= thick; t++)
				darken(x + t * Math.sin(angle), y - t * Math.cos(angle), c.depth);
			// Heat checks branch at steep angles, which builds the network.
			if (rand() < 0.015 * grade) {
				queue.push({
					x,
					y,
					angle: angle + (rand() < 0.5 ? 1.3 : -1.3),
					length: c.length * 0.5,
					depth: c.depth * 0.8
				});
			}
		}
	}
	const data = Buffer.alloc(width * height * 4);
	for (let i = 0; i < width * height; i++) {
		const v = Math.max(0, Math.min(255, Math.round(shade[i])));
		data[i * 4] = v;
		data[i * 4 + 1] = v;
		data[i * 4 + 2] = Math.min(255, v + 6);
		data[i * 4 + 3] = 255;
	}
	return new Jimp({ data, width, height }).getBuffer('image/jpeg', { quality: 88 });
}

const photoFile = (bytes: Buffer, name: string) =>
	new File([new Uint8Array(bytes)], name, { type: 'image/jpeg' });

export interface ToolroomSeedSummary {
	jobs: number;
	inspections: number;
	photos: number;
	circuits: number;
	checks: number;
}

/** Adds the toolroom story to a seeded demo plant (after seedDemo). */
export async function seedToolroomDemo(
	db: DB,
	now: Date,
	photoStore: PhotoStore = photoStoreFromEnv(process.env)
): Promise<ToolroomSeedSummary> {
	const users = await db.selectFrom('users').select(['id', 'role']).execute();
	const lead: Actor = {
		userId: users.find((u) => u.role === 'toolroom_lead')!.id,
		role: 'toolroom_lead'
	};
	const maker: Actor = { userId: users.find((u) => u.role === 'toolmaker')!.id, role: 'toolmaker' };
	const dies = new Map(
		(await db.selectFrom('dies').select(['id', 'number', 'total_shots', 'status']).execute()).map(
			(d) => [d.number, d]
		)
	);
	const die = (number: string) => {
		const d = dies.get(number);
		if (!d) throw new Error(`Demo die ${number} is missing.`);
		return d;
	};
	const daysAgo = (days: number, hour = 9) =>
		new Date(
			Date.parse(now.toISOString().slice(0, 10)) - days * DAY + hour * 3_600_000
		).toISOString();
	const summary: ToolroomSeedSummary = {
		jobs: 0,
		inspections: 0,
		photos: 0,
		circuits: 0,
		checks: 0
	};
	let seed = 4100;

	// Surface inspections: D-0131's gate side gets worse shot by shot; a few other zones and dies.
	const inspections: {
		die: string;
		half: 'cover' | 'ejector';
		zone: string;
		fraction: number;
		grade: number;
		crack: number | null;
		days: number;
		photo: boolean;
		notes?: string;
	}[] = [
		{
			die: 'D-0131',
			half: 'cover',
			zone: 'gate side',
			fraction: 0.55,
			grade: 1,
			crack: 0.8,
			days: 210,
			photo: true
		},
		{
			die: 'D-0131',
			half: 'cover',
			zone: 'gate side',
			fraction: 0.7,
			grade: 1,
			crack: 1.5,
			days: 150,
			photo: true
		},
		{
			die: 'D-0131',
			half: 'cover',
			zone: 'gate side',
			fraction: 0.84,
			grade: 2,
			crack: 3,
			days: 80,
			photo: true
		},
		// Welded at 87 % (the repair job below): the zone's series starts again.
		{
			die: 'D-0131',
			half: 'cover',
			zone: 'gate side',
			fraction: 0.9,
			grade: 0,
			crack: null,
			days: 40,
			photo: true,
			notes: 'First look after the weld repair: clean.'
		},
		{
			die: 'D-0131',
			half: 'cover',
			zone: 'gate side',
			fraction: 0.97,
			grade: 1,
			crack: 0.6,
			days: 12,
			photo: true,
			notes: 'Fine hairlines again beside the weld.'
		},
		{
			die: 'D-0131',
			half: 'ejector',
			zone: 'core 2',
			fraction: 0.7,
			grade: 0,
			crack: null,
			days: 150,
			photo: false
		},
		{
			die: 'D-0131',
			half: 'ejector',
			zone: 'core 2',
			fraction: 0.97,
			grade: 1,
			crack: 0.5,
			days: 12,
			photo: true
		},
		{
			die: 'D-0120',
			half: 'cover',
			zone: 'runner',
			fraction: 0.9,
			grade: 1,
			crack: 1,
			days: 30,
			photo: true
		},
		{
			die: 'D-0125',
			half: 'cover',
			zone: 'cavity 1, boss',
			fraction: 0.8,
			grade: 2,
			crack: 2.5,
			days: 45,
			photo: true
		},
		{
			die: 'D-0138',
			half: 'ejector',
			zone: 'gate side',
			fraction: 0.9,
			grade: 3,
			crack: 7,
			days: 20,
			photo: true,
			notes: 'Open network across the sealing face.'
		}
	];
	// The toolroom lead's zone lists: a starting list on every die, plus every zone the
	// inspections use, on its half.
	for (const d of dies.values()) {
		for (const [half, name] of [
			['cover', 'gate side'],
			['cover', 'cavity 1'],
			['ejector', 'core 1'],
			['ejector', 'ejector pin bosses']
		] as const) {
			await addDieZone(db, d.id, { half, name }, lead, daysAgo(220));
		}
	}
	for (const ins of inspections) {
		const d = die(ins.die);
		if (!(await findDieZone(db, d.id, ins.half, ins.zone))) {
			const added = await addDieZone(
				db,
				d.id,
				{ half: ins.half, name: ins.zone },
				lead,
				daysAgo(220)
			);
			if (!added.ok) throw new Error(`Demo zone on ${ins.die}: ${added.message}`);
		}
	}
	// D-0131's gate side was welded 55 days ago (a closed repair job that records the zone).
	const welded = die('D-0131');
	const weldShots = Math.round(welded.total_shots * 0.87);
	const weldJob = await db
		.insertInto('toolroom_jobs')
		.values({
			number: 'TJ-WELD',
			die_id: welded.id,
			kind: 'repair',
			half: 'cover',
			zone: 'gate side',
			description: 'Weld the heat-check network on the gate side and re-polish.',
			source: 'die',
			status: 'done',
			die_to_toolroom: 1,
			die_shots_at_open: weldShots,
			die_shots_at_close: weldShots,
			opened_by: lead.userId,
			opened_at: daysAgo(58),
			updated_at: daysAgo(55, 16),
			closed_at: daysAgo(55, 16),
			closed_by: maker.userId,
			findings: 'Grade 2 network, longest crack 3 mm, towards the overflow.',
			work_done: 'TIG weld with H13 filler, stress relieved, re-machined and polished.',
			hours: 9
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	await db
		.updateTable('toolroom_jobs')
		.set({ number: `TJ-${String(weldJob.id).padStart(5, '0')}` })
		.where('id', '=', weldJob.id)
		.execute();
	const gateSide = (await findDieZone(db, welded.id, 'cover', 'gate side'))!;
	const weldRecorded = await recordJobRepairs(
		db,
		weldJob.id,
		[{ zoneId: gateSide.id, kind: 'weld' }],
		lead,
		daysAgo(55, 16)
	);
	if (!weldRecorded.ok) throw new Error(`Demo weld repair: ${weldRecorded.message}`);
	summary.jobs++;

	for (const ins of inspections) {
		const d = die(ins.die);
		const files = ins.photo
			? [photoFile(await drawSurfaceImage(seed++, ins.grade), 'surface.jpg')]
			: [];
		const result = await recordInspection(db, {
			dieId: d.id,
			form: {
				half: ins.half,
				zone: ins.zone,
				shotsAt: Math.round(d.total_shots * ins.fraction),
				grade: ins.grade,
				longestCrackMm: ins.crack,
				soldering: ins.grade >= 3,
				erosion: false,
				notes: ins.notes ?? null
			},
			files,
			actor: maker,
			photoStore,
			at: daysAgo(ins.days, 10)
		});
		if (!result.ok) throw new Error(`Demo inspection on ${ins.die}: ${result.message}`);
		summary.inspections++;
		summary.photos += result.photos;
	}

	// Cooling circuits and checks; C1 on D-0120 has dropped to 65 % of nominal (scale build-up).
	const circuits: {
		die: string;
		half: 'cover' | 'ejector';
		label: string;
		coolant: 'water' | 'oil';
		d: number;
		nominal: number;
		flows: number[];
		inlet: number;
		rise: number;
		oil?: [number, number, number];
	}[] = [
		{
			die: 'D-0120',
			half: 'cover',
			label: 'C1 cavity',
			coolant: 'water',
			d: 10,
			nominal: 18,
			flows: [17.6, 15.1, 11.7],
			inlet: 28,
			rise: 6
		},
		{
			die: 'D-0120',
			half: 'ejector',
			label: 'E1 core',
			coolant: 'water',
			d: 8,
			nominal: 12,
			flows: [11.8, 11.2],
			inlet: 28,
			rise: 5
		},
		{
			die: 'D-0113',
			half: 'cover',
			label: 'C1',
			coolant: 'water',
			d: 12,
			nominal: 24,
			flows: [23.5, 22.8],
			inlet: 25,
			rise: 7
		},
		{
			die: 'D-0113',
			half: 'ejector',
			label: 'E1',
			coolant: 'water',
			d: 12,
			nominal: 24,
			flows: [24.1],
			inlet: 25,
			rise: 6
		},
		{
			die: 'D-0131',
			half: 'cover',
			label: 'Oil 1',
			coolant: 'oil',
			d: 12,
			nominal: 30,
			flows: [28.5, 27.9],
			inlet: 160,
			rise: 9,
			oil: [850, 4.2, 2350]
		},
		{
			die: 'D-0138',
			half: 'cover',
			label: 'C1 gate',
			coolant: 'water',
			d: 10,
			nominal: 16,
			flows: [15.2],
			inlet: 30,
			rise: 8
		}
	];
	for (const c of circuits) {
		const d = die(c.die);
		const added = await addCircuit(db, {
			dieId: d.id,
			form: {
				half: c.half,
				label: c.label,
				coolant: c.coolant,
				channelDiameterMm: c.d,
				nominalFlowLpm: c.nominal
			},
			actor: lead,
			at: daysAgo(200)
		});
		if (!added.ok) throw new Error(`Demo circuit on ${c.die}: ${added.message}`);
		summary.circuits++;
		for (const [i, flow] of c.flows.entries()) {
			const checked = await recordCheck(db, {
				dieId: d.id,
				form: coolingCheckSchema.parse({
					circuitId: added.id,
					measuredFlowLpm: flow,
					inletC: c.inlet,
					outletC: c.inlet + c.rise * (c.flows[0] / flow),
					supplyPressureBar: c.coolant === 'oil' ? 4 : 5.5,
					leakTest: 'pass',
					notes:
						i === c.flows.length - 1 && flow / c.nominal < 0.8
							? 'Flow down; flush and descale at the next change.'
							: '',
					oilDensityKgM3: c.oil?.[0] ?? '',
					oilViscosityMpaS: c.oil?.[1] ?? '',
					oilSpecificHeatJKgK: c.oil?.[2] ?? ''
				}),
				actor: maker,
				at: daysAgo(120 - i * 50 - (c.flows.length - 1 - i) * 5, 14)
			});
			if (!checked.ok) throw new Error(`Demo check on ${c.die}: ${checked.message}`);
			summary.checks++;
		}
	}

	// Most other dies get their two standard circuits (cover and ejector, water), each checked
	// once at a healthy flow; every seventh die and retired dies stay without, so the empty state
	// shows too. Invented figures.
	const specified = new Set(circuits.map((c) => c.die));
	for (const d of [...dies.values()].sort((a, b) => a.number.localeCompare(b.number))) {
		const n = Number(d.number.replace(/\D/g, ''));
		if (specified.has(d.number) || d.status === 'retired' || n % 7 === 0) continue;
		for (const [half, label, diameter, nominal] of [
			['cover', 'C1 cavity', 10, 16],
			['ejector', 'E1 core', 8, 12]
		] as const) {
			const added = await addCircuit(db, {
				dieId: d.id,
				form: {
					half,
					label,
					coolant: 'water',
					channelDiameterMm: diameter,
					nominalFlowLpm: nominal
				},
				actor: maker,
				at: daysAgo(210)
			});
			if (!added.ok) throw new Error(`Demo circuit on ${d.number}: ${added.message}`);
			summary.circuits++;
			const flow = Math.round(nominal * (0.86 + ((n * 7) % 12) / 100) * 10) / 10;
			const checked = await recordCheck(db, {
				dieId: d.id,
				form: coolingCheckSchema.parse({
					circuitId: added.id,
					measuredFlowLpm: flow,
					inletC: 30,
					outletC: 36,
					supplyPressureBar: 5.5,
					leakTest: 'pass',
					notes: ''
				}),
				actor: maker,
				at: daysAgo(40 + (n % 30), 11)
			});
			if (!checked.ok) throw new Error(`Demo check on ${d.number}: ${checked.message}`);
			summary.checks++;
		}
	}

	// Jobs. Historic ones are opened without moving the die and without service tasks, so the
	// scenario's die states and due tasks stay as they are.
	const closeForm = (
		findings: string,
		work: string,
		hours: number,
		summaryText: string,
		shared: boolean
	) =>
		closeJobSchema.parse({
			findings,
			workDone: work,
			hours,
			partsUsed: '',
			billableToOwner: hours > 4,
			ownerSummary: summaryText,
			summaryShared: shared
		});
	const job = async (
		number: string,
		form: Partial<OpenJobForm> & { description: string },
		openedDaysAgo: number,
		actor: Actor = lead
	) => {
		const d = die(number);
		const opened = await openJob(db, {
			dieId: d.id,
			form: {
				kind: 'repair',
				half: 'cover',
				zone: null,
				assignedTo: maker.userId,
				serviceTaskIds: [],
				dieToToolroom: false,
				noticeId: undefined,
				...form
			},
			actor,
			at: daysAgo(openedDaysAgo, 7)
		});
		if (!opened.ok) throw new Error(`Demo job on ${number}: ${opened.message}`);
		summary.jobs++;
		return { ...opened, die: d };
	};

	const historic: [
		string,
		Partial<OpenJobForm> & { description: string },
		number,
		number,
		Parameters<typeof closeForm>,
		boolean
	][] = [
		[
			'D-0103',
			{
				kind: 'repair',
				half: 'cover',
				zone: 'parting line',
				description: 'Flash along the parting line at the lower corner.'
			},
			140,
			2,
			[
				'Parting line worn at the lower corner, 0.1 mm step.',
				'Welded and re-machined the corner, spotted both halves.',
				6,
				'Parting line repaired; flash gone on the first 200 shots.',
				true
			],
			true
		],
		[
			'D-0113',
			{
				kind: 'modification',
				half: 'ejector',
				zone: 'cavity 2',
				description: 'Owner asked for a deeper part-number stamp.'
			},
			95,
			1,
			[
				'Insert stamp 0.3 mm deep.',
				'Re-cut stamp to 0.6 mm, polished.',
				2.5,
				'Part-number stamp deepened as requested.',
				true
			],
			false
		],
		[
			'D-0125',
			{
				kind: 'repair',
				half: 'cover',
				zone: 'cavity 1, boss',
				description: 'Soldering on the boss core, parts sticking.'
			},
			60,
			3,
			[
				'Aluminium soldered on the boss core; draft worn.',
				'Cleaned, polished, re-nitrided the core tip.',
				9,
				'Core cleaned and surface-treated; sticking resolved.',
				false
			],
			false
		],
		[
			'D-0138',
			{
				kind: 'repair',
				half: 'ejector',
				zone: 'gate side',
				description: 'Heat checking at the gate marks the casting.'
			},
			25,
			4,
			[
				'Grade 3 network at the gate, 7 mm longest crack.',
				'Ground out, TIG welded with H13 filler, re-polished; stress relieved.',
				14,
				'Gate area repaired by welding; the die runs again.',
				true
			],
			false
		]
	];
	for (const [number, form, openedAgo, tookDays, close, withPhotos] of historic) {
		const opened = await job(number, form, openedAgo);
		const jobRow = await db
			.selectFrom('toolroom_jobs')
			.select('id')
			.where('number', '=', opened.number)
			.executeTakeFirstOrThrow();
		await moveJob(db, {
			number: opened.number,
			to: 'in_progress',
			actor: maker,
			at: daysAgo(openedAgo, 8)
		});
		if (withPhotos) {
			// Each photo with its own caption and before/after tag (one upload per photo, as the
			// phone form sends them).
			const shots: [number, string, string, 'before' | 'after'][] = [
				[2, 'before.jpg', 'Parting line before the repair: open heat checking', 'before'],
				[0, 'after.jpg', 'Parting line after grinding and polishing', 'after']
			];
			for (const [grade, name, caption, stage] of shots) {
				const uploaded = await uploadPhotos(db, {
					target: { jobId: jobRow.id },
					files: [photoFile(await drawSurfaceImage(seed++, grade), name)],
					actor: maker,
					photoStore,
					caption,
					stage,
					at: daysAgo(openedAgo - tookDays, 11)
				});
				if (!uploaded.ok) throw new Error(`Demo job photos: ${uploaded.message}`);
				summary.photos += uploaded.count;
			}
			const shared = await db
				.selectFrom('photos')
				.select('public_id')
				.where('job_id', '=', jobRow.id)
				.execute();
			for (const p of shared)
				await setPhotoShared(db, {
					publicId: p.public_id,
					shared: true,
					actor: lead,
					at: daysAgo(openedAgo - tookDays, 12)
				});
		}
		const closed = await closeJob(db, {
			number: opened.number,
			form: closeForm(...close),
			actor: maker,
			at: daysAgo(openedAgo - tookDays, 16)
		});
		if (!closed.ok) throw new Error(`Demo close ${opened.number}: ${closed.message}`);
		// Back-date the shot counts, and record that the die was in the toolroom meanwhile.
		const shotsThen = Math.round(opened.die.total_shots * (1 - openedAgo / 600));
		await db
			.updateTable('toolroom_jobs')
			.set({ die_to_toolroom: 1, die_shots_at_open: shotsThen, die_shots_at_close: shotsThen })
			.where('number', '=', opened.number)
			.execute();
	}

	// Open jobs on the board: D-0119 is in the toolroom already, D-0109 is held awaiting the owner,
	// D-0131 runs on while replacement ejector pins are on order.
	await job(
		'D-0119',
		{
			kind: 'stress_relief',
			half: 'both',
			description: 'Stress relief cycle and full surface inspection before the next run.',
			dieToToolroom: true
		},
		6
	);
	const pins = await job(
		'D-0131',
		{
			kind: 'repair',
			half: 'ejector',
			zone: 'ejector pins 4–7',
			description: 'Four ejector pins galled; replace at the next die change.'
		},
		9
	);
	await moveJob(db, { number: pins.number, to: 'in_progress', actor: maker, at: daysAgo(8) });
	await moveJob(db, { number: pins.number, to: 'waiting_parts', actor: maker, at: daysAgo(8, 15) });
	await job(
		'D-0109',
		{
			kind: 'modification',
			half: 'cover',
			zone: 'cavity 1',
			description: 'Porosity complaint: add an overflow at the far end if the owner agrees.',
			assignedTo: ''
		},
		3
	);
	// D-0109 waits for its owner: the question with the quote, as the portal shows it.
	const held = await db
		.selectFrom('dies')
		.select('id')
		.where('number', '=', 'D-0109')
		.executeTakeFirstOrThrow();
	await askOwnerDecision(
		db,
		held.id,
		{
			question:
				'Porosity at the far end of cavity 1. May we add an overflow there (a modification to your die), or do you want to keep it as it is?',
			quotedHours: 14,
			quotedCost: 2400
		},
		lead.userId,
		daysAgo(3, 10)
	);

	await closePhotoPool();
	return summary;
}
