import { beforeEach, describe, expect, test } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { dieFormSchema } from '../../src/lib/schemas/die';
import { ownerDieQuerySchema } from '../../src/lib/schemas/owner';
import { createDie } from '../../src/lib/server/dies/die-write';
import { dieLife, findDie } from '../../src/lib/server/dies/die-detail';
import { recordShots } from '../../src/lib/server/shots/ledger';
import {
	describeLastJob,
	loadOwnerDies,
	pageOwnerDies,
	summariseOwnerDies
} from '../../src/lib/server/owner/portfolio';
import {
	countOpenBookings,
	findOwnerDie,
	getOwnerDieStory,
	listOwnerJobs,
	listSharedPhotos,
	monthlyLedger
} from '../../src/lib/server/owner/die-page';
import { buildPeriodStatement } from '../../src/lib/server/owner/period-statement';
import { renderPeriodStatementPdf, toWinAnsi } from '../../src/lib/server/owner/statement-pdf';
import { resolvePeriod } from '../../src/lib/calc/statement-period';
import { setJobSharing, setPhotoSharing } from '../../src/lib/server/owner/sharing';

const AS_OF = '2026-06-30T12:00:00.000Z';
const DAY = 86_400_000;
const daysAgo = (n: number) => new Date(Date.parse(AS_OF) - n * DAY).toISOString();

let db: DB;
let acme: number;
let bolt: number;
const ADMIN = 'admin-1';
const dieIds = new Map<string, number>();

async function die(number: string, customerId: number, alloyCode: string, partName: string) {
	const alloy = await db
		.selectFrom('alloys')
		.select('id')
		.where('code', '=', alloyCode)
		.executeTakeFirstOrThrow();
	const form = dieFormSchema.parse({
		number,
		partName,
		customerId,
		alloyId: alloy.id,
		process: alloyCode === 'A380' ? 'cold_chamber' : 'hot_chamber',
		cavities: 1,
		projectedAreaCm2: 300
	});
	expect(await createDie(db, form, ADMIN, daysAgo(400))).toEqual({ ok: true, number });
	const row = await db
		.selectFrom('dies')
		.select('id')
		.where('number', '=', number)
		.executeTakeFirstOrThrow();
	dieIds.set(number, row.id);
}

async function shots(number: string, entries: [daysAgo: number, shots: number][]) {
	const result = await recordShots(
		db,
		entries.map(([d, n]) => ({ die: number, shots: n, countedAt: daysAgo(d) })),
		{ userId: ADMIN, tokenId: null, customerId: null },
		{ source: 'manual', now: AS_OF }
	);
	expect(result.ok).toBe(true);
}

let jobSeq = 0;
async function job(
	number: string,
	over: Partial<{
		status: 'open' | 'done' | 'cancelled';
		kind: string;
		closedDaysAgo: number;
		summary: string | null;
		shared: boolean;
		billable: boolean;
	}> = {}
) {
	jobSeq++;
	const status = over.status ?? 'done';
	const closedAt = status === 'open' ? null : daysAgo(over.closedDaysAgo ?? 10);
	const row = await db
		.insertInto('toolroom_jobs')
		.values({
			number: `TJ-${String(jobSeq).padStart(5, '0')}`,
			die_id: dieIds.get(number)!,
			kind: over.kind ?? 'repair',
			half: 'cover',
			description: `INTERNAL description ${jobSeq}`,
			source: 'die',
			die_shots_at_open: 0,
			opened_by: ADMIN,
			opened_at: daysAgo((over.closedDaysAgo ?? 10) + 2),
			updated_at: AS_OF,
			status,
			closed_at: closedAt,
			findings: `SECRET findings ${jobSeq}`,
			work_done: `SECRET work ${jobSeq}`,
			hours: 7.5,
			parts_used: 'SECRET parts',
			billable_to_owner: over.billable ? 1 : 0,
			owner_summary: over.summary ?? null,
			summary_shared: over.shared ? 1 : 0,
			cancel_reason: status === 'cancelled' ? 'mistake' : null
		})
		.returning(['id', 'number'])
		.executeTakeFirstOrThrow();
	return row;
}

let photoSeq = 0;
async function photo(number: string, jobId: number, shared: boolean) {
	photoSeq++;
	const publicId = `photo-public-${photoSeq}-xyz`;
	await db
		.insertInto('photos')
		.values({
			public_id: publicId,
			job_id: jobId,
			inspection_id: null,
			die_id: dieIds.get(number)!,
			full_file: `f/${photoSeq}.jpg`,
			thumb_file: `t/${photoSeq}.jpg`,
			width: 800,
			height: 600,
			sha256: 'ab'.repeat(32),
			bytes: 1000,
			thumb_bytes: 100,
			source_type: 'jpeg',
			uploaded_by: ADMIN,
			uploaded_at: daysAgo(9),
			caption: `caption ${photoSeq}`,
			shared_with_owner: shared ? 1 : 0
		})
		.execute();
	return publicId;
}

beforeEach(async () => {
	db = await openTestDatabase();
	jobSeq = 0;
	photoSeq = 0;
	dieIds.clear();
	await db
		.insertInto('customers')
		.values([
			{ code: 'ACME', name: 'Acme Pumps' },
			{ code: 'BOLT', name: 'Bolt Tools' }
		])
		.execute();
	const ids = await db.selectFrom('customers').select(['id', 'code']).execute();
	acme = ids.find((c) => c.code === 'ACME')!.id;
	bolt = ids.find((c) => c.code === 'BOLT')!.id;
	await db
		.insertInto('users')
		.values({
			id: ADMIN,
			email: 'a@p.test',
			name: 'A',
			role: 'admin',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	await die('D-0001', acme, 'A380', 'Impeller housing'); // 125 000 expected life
	await die('D-0002', acme, 'ZP0400', 'Bracket');
	await die('D-0003', bolt, 'A380', 'Hammer head');
	await die('D-0004', acme, 'A380', 'Retired cover');
	// D-0001: 1 000 long ago, then 2 800 within the trailing 28 days (100 shots/day).
	await shots('D-0001', [
		[100, 1000],
		[40, 400],
		[10, 1400],
		[3, 1400]
	]);
	// D-0002 has not run for months: no projection.
	await shots('D-0002', [[200, 500]]);
	await shots('D-0003', [[5, 5000]]);
	await shots('D-0004', [[300, 130_000]]);
	await db
		.updateTable('dies')
		.set({ status: 'retired', retired_at: daysAgo(250) })
		.where('number', '=', 'D-0004')
		.execute();
});

describe('owner portfolio', () => {
	test('lists only the customer’s own dies, with the same life figures as the die page', async () => {
		const rows = await loadOwnerDies(db, acme, AS_OF);
		expect(rows.map((r) => r.number)).toEqual(['D-0001', 'D-0002', 'D-0004']);
		expect((await loadOwnerDies(db, bolt, AS_OF)).map((r) => r.number)).toEqual(['D-0003']);
		expect(await loadOwnerDies(db, 9999, AS_OF)).toEqual([]);

		// The batched read must agree with dieLife, which reads one die at a time.
		for (const r of rows.filter((x) => x.status !== 'retired')) {
			const found = (await findDie(db, r.number, { customerId: acme }))!;
			const single = await dieLife(db, found, AS_OF);
			expect(r.lifeUsedPct).toBeCloseTo(single.lifeUsedPct, 10);
			expect(r.shotsPerDay).toBeCloseTo(single.shotsPerDay, 10);
			expect(r.projectedEndOfLife).toBe(single.projectedEndOfLife);
		}
		const d1 = rows[0];
		expect(d1.totalShots).toBe(4200);
		expect(d1.shotsLast28Days).toBe(2800);
		expect(d1.shotsPerDay).toBeCloseTo(100, 10);
		// (125 000 − 4 200) / 100 = 1 208 days after 2026-06-30.
		expect(d1.projectedEndOfLife).toBe('2029-10-20');
		expect(rows[1].projectedEndOfLife).toBeNull();
		const retired = rows[2];
		expect(retired.projectedEndOfLife).toBeNull();
		expect(retired.nextService).toBeNull();
		expect(d1.nextService).not.toBeNull();
	});

	test('the last job shows only the shared summary, else just the date', async () => {
		await job('D-0001', { closedDaysAgo: 30, summary: 'Cavity polished.', shared: true });
		await job('D-0001', { closedDaysAgo: 8, summary: 'Not for the owner yet', shared: false });
		await job('D-0001', { status: 'open' });
		await job('D-0002', { closedDaysAgo: 20, summary: 'Cooling lines flushed.', shared: true });
		await job('D-0002', { status: 'cancelled', closedDaysAgo: 1, summary: 'x', shared: true });
		const rows = await loadOwnerDies(db, acme, AS_OF);
		const [d1, d2, d4] = rows;
		expect(d1.lastJob).toEqual({ closedAt: daysAgo(8), kind: 'repair', summary: null });
		expect(describeLastJob(d1.lastJob)).toBe(`Serviced on ${daysAgo(8).slice(0, 10)}`);
		expect(d2.lastJob?.summary).toBe('Cooling lines flushed.');
		expect(d4.lastJob).toBeNull();
		expect(JSON.stringify(rows)).not.toMatch(/SECRET|INTERNAL|Not for the owner/);
	});

	test('search, filter, sort and totals', async () => {
		const rows = await loadOwnerDies(db, acme, AS_OF);
		const q = (over: Record<string, string>) =>
			pageOwnerDies(rows, ownerDieQuerySchema.parse(over)).rows.map((r) => r.number);
		expect(q({ q: 'bracket' })).toEqual(['D-0002']);
		expect(q({ q: 'd-0004' })).toEqual(['D-0004']);
		expect(q({ q: 'hammer' })).toEqual([]);
		expect(q({ status: 'retired' })).toEqual(['D-0004']);
		expect(q({ status: 'active' })).toEqual(['D-0001', 'D-0002']);
		expect(q({ sort: 'shots', dir: 'desc' })).toEqual(['D-0004', 'D-0001', 'D-0002']);
		// Dies without a projection go last whichever way the column is sorted.
		expect(q({ sort: 'eol', dir: 'asc' })).toEqual(['D-0001', 'D-0002', 'D-0004']);
		expect(q({ sort: 'eol', dir: 'desc' })).toEqual(['D-0001', 'D-0002', 'D-0004']);
		expect(q({ sort: 'nonsense' })).toEqual(['D-0001', 'D-0002', 'D-0004']);
		const page = pageOwnerDies(rows, ownerDieQuerySchema.parse({ size: '10', page: '2' }));
		expect(page).toEqual({ rows: [], total: 3 });

		const totals = summariseOwnerDies(rows);
		expect(totals).toMatchObject({
			dies: 3,
			inService: 2,
			retired: 1,
			totalShots: 4200 + 500 + 130_000,
			shotsLast28Days: 2800,
			nearReplacement: 0,
			nextReplacement: { number: 'D-0001', date: '2029-10-20' }
		});
	});
});

describe('owner die page', () => {
	test('another owner’s die is not found', async () => {
		expect(await findOwnerDie(db, acme, 'D-0003')).toBeUndefined();
		expect(await findOwnerDie(db, acme, 'd-0001')).toMatchObject({ number: 'D-0001' });
		expect(await findOwnerDie(db, bolt, 'D-0001')).toBeUndefined();
	});

	test('service history: no cancelled jobs, summaries only when shared, no internals', async () => {
		await job('D-0001', {
			closedDaysAgo: 30,
			summary: 'Cavity polished.',
			shared: true,
			billable: true
		});
		await job('D-0001', { closedDaysAgo: 8, summary: 'Draft text', shared: false });
		await job('D-0001', { closedDaysAgo: 5, summary: '   ', shared: true });
		await job('D-0001', { status: 'cancelled', closedDaysAgo: 2 });
		await job('D-0001', { status: 'open', closedDaysAgo: 0 });
		const jobs = await listOwnerJobs(db, dieIds.get('D-0001')!);
		expect(jobs.map((j) => [j.number, j.finished, j.billable, j.summary])).toEqual([
			['TJ-00005', false, false, null],
			['TJ-00003', true, false, null],
			['TJ-00002', true, false, null],
			['TJ-00001', true, true, 'Cavity polished.']
		]);
		expect(Object.keys(jobs[0]).sort()).toEqual(
			['billable', 'closedAt', 'finished', 'half', 'kind', 'number', 'openedAt', 'summary'].sort()
		);
		expect(JSON.stringify(jobs)).not.toMatch(/SECRET|INTERNAL|Draft/);
	});

	test('photos: only shared ones of this die; bookings: a count of open ones', async () => {
		const j1 = await job('D-0001', {});
		const j3 = await job('D-0003', {});
		const shared = await photo('D-0001', j1.id, true);
		await photo('D-0001', j1.id, false);
		await photo('D-0003', j3.id, true);
		const photos = await listSharedPhotos(db, dieIds.get('D-0001')!);
		expect(photos.map((p) => p.publicId)).toEqual([shared]);

		const machine = await db
			.insertInto('machines')
			.values({ name: 'P1', chamber: 'cold', clamp_force_kn: 4000 })
			.returning('id')
			.executeTakeFirstOrThrow();
		const booking = (dieNumber: string, from: number, to: number, cancelled = false) => ({
			die_id: dieIds.get(dieNumber)!,
			machine_id: machine.id,
			starts_at: daysAgo(from),
			ends_at: daysAgo(to),
			order_ref: `ORDER-${dieNumber}-${from}`,
			parts: 100,
			shots_per_hour: 50,
			created_at: daysAgo(60),
			cancelled_at: cancelled ? daysAgo(1) : null
		});
		await db
			.insertInto('press_bookings')
			.values([
				booking('D-0001', 20, 18), // finished
				booking('D-0001', 1, -1), // running now
				booking('D-0001', -5, -7), // to come
				booking('D-0001', -10, -12, true), // cancelled
				booking('D-0003', -5, -7) // another owner's die
			])
			.execute();
		expect(await countOpenBookings(db, dieIds.get('D-0001')!, AS_OF)).toBe(2);
		const story = await getOwnerDieStory(db, (await findOwnerDie(db, acme, 'D-0001'))!, AS_OF);
		expect(story.openBookings).toBe(2);
		expect(JSON.stringify(story)).not.toMatch(/ORDER-|SECRET|INTERNAL/);
		expect(story.series.at(-1)).toMatchObject({ total: 4200 });
	});

	test('monthly ledger sums the daily roll-up and ends at the register total', async () => {
		const months = await monthlyLedger(db, dieIds.get('D-0001')!, 4200);
		expect(months.reduce((s, m) => s + m.shots, 0)).toBe(4200);
		expect(months.at(-1)).toMatchObject({
			month: '2026-06',
			shots: 2800,
			daysRun: 2,
			totalAtEnd: 4200
		});
		expect(months[0]).toMatchObject({ month: '2026-03', shots: 1000, totalAtEnd: 1000 });
		expect(months.map((m) => m.month)).toEqual(['2026-03', '2026-05', '2026-06']);
	});
});

describe('owner statement', () => {
	// The period statement (period-statement.ts) for the quarter of AS_OF: Q2 2026.
	const Q2 = resolvePeriod({ kind: 'quarter', year: 2026, quarter: 2 });
	const issue = { reference: 'ST-ACME-20260630-01', issuedAt: AS_OF };

	test('holds only the owner’s dies, and of jobs only shared or billable ones, without internals', async () => {
		for (let i = 0; i < 5; i++) {
			await job('D-0001', {
				closedDaysAgo: 50 - i * 10,
				summary: `Shared summary ${i}`,
				shared: true,
				billable: i % 2 === 0
			});
		}
		await job('D-0001', { closedDaysAgo: 2, summary: 'Private words', shared: false });
		await job('D-0003', { closedDaysAgo: 2, summary: 'Bolt summary', shared: true });
		const s = (await buildPeriodStatement(db, acme, Q2, issue))!;
		expect(s.customer).toMatchObject({ code: 'ACME', name: 'Acme Pumps' });
		expect(s.dies.map((d) => d.number)).toEqual(['D-0001', 'D-0002', 'D-0004']);
		const d1 = s.dies[0];
		// Five shared jobs closed 50, 40, 30, 20 and 10 days before 30 June: all in Q2; the
		// private, unbilled one is not the owner's history.
		expect(d1.services.filter((e) => e.kind === 'job').map((e) => e.detail)).toEqual([
			'Shared summary 4',
			'Shared summary 3',
			'Shared summary 2',
			'Shared summary 1',
			'Shared summary 0'
		]);
		// Billable: i = 0, 2, 4, each 7.5 h.
		expect(d1.repairs.map((r) => r.hours)).toEqual([7.5, 7.5, 7.5]);
		expect(s.totals.repairHours).toBe(22.5);
		expect(s.dies[1].services).toEqual([]);
		expect(JSON.stringify(s)).not.toMatch(/Private|Bolt|SECRET|INTERNAL|D-0003/);
		expect(await buildPeriodStatement(db, 9999, Q2, issue)).toBeUndefined();
	});

	test('the PDF is a PDF, names the plant and the owner’s dies, and nothing of others', async () => {
		await job('D-0001', { closedDaysAgo: 5, summary: 'Ejector pins replaced (x4).', shared: true });
		await db.updateTable('plant_settings').set({ plant_name: 'Kestrel Test Works' }).execute();
		const s = (await buildPeriodStatement(db, acme, Q2, issue))!;
		const pdf = await renderPeriodStatementPdf(s);
		expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
		const text = pdfText(pdf);
		for (const n of [
			'D-0001',
			'D-0002',
			'D-0004',
			'Kestrel Test Works',
			'Acme Pumps',
			'ST-ACME-20260630-01'
		]) {
			expect(text).toContain(n);
		}
		expect(text).toContain('Ejector pins replaced (x4).');
		expect(text).not.toContain('D-0003');
		expect(text).not.toContain('Bolt');
	});

	test('text outside the standard fonts’ WinAnsi set is replaced, not garbled', () => {
		expect(toWinAnsi('≥ 90 % – Größe “ok” 漢')).toBe('>= 90 % – Größe “ok” ?');
	});
});

describe('sharing controls', () => {
	test('a summary is shared only with text, within its die, and every change is audited', async () => {
		const j = await job('D-0001', {});
		const other = await job('D-0003', {});
		const d1 = dieIds.get('D-0001')!;
		expect(
			await setJobSharing(db, {
				dieId: d1,
				jobNumber: j.number,
				ownerSummary: ' ',
				shared: true,
				actorId: ADMIN
			})
		).toMatchObject({ ok: false, status: 400 });
		expect(
			await setJobSharing(db, {
				dieId: d1,
				jobNumber: other.number,
				ownerSummary: 'x',
				shared: true,
				actorId: ADMIN
			})
		).toMatchObject({ ok: false, status: 404 });
		expect(
			await setJobSharing(db, {
				dieId: d1,
				jobNumber: j.number,
				ownerSummary: '  Polished the cavity.  ',
				shared: true,
				actorId: ADMIN
			})
		).toMatchObject({ ok: true });
		expect((await listOwnerJobs(db, d1))[0].summary).toBe('Polished the cavity.');
		await setJobSharing(db, {
			dieId: d1,
			jobNumber: j.number,
			ownerSummary: 'Polished the cavity.',
			shared: false,
			actorId: ADMIN
		});
		expect((await listOwnerJobs(db, d1))[0].summary).toBeNull();
		const otherJob = await db
			.selectFrom('toolroom_jobs')
			.select(['owner_summary', 'summary_shared'])
			.where('id', '=', other.id)
			.executeTakeFirstOrThrow();
		expect(otherJob).toEqual({ owner_summary: null, summary_shared: 0 });
		const audit = await db
			.selectFrom('audit_log')
			.select(['action', 'die_id'])
			.where('action', '=', 'job.owner_summary')
			.execute();
		expect(audit).toEqual([
			{ action: 'job.owner_summary', die_id: d1 },
			{ action: 'job.owner_summary', die_id: d1 }
		]);
	});

	test('a photo is shared and hidden within its die only', async () => {
		const j = await job('D-0001', {});
		const j3 = await job('D-0003', {});
		const mine = await photo('D-0001', j.id, false);
		const theirs = await photo('D-0003', j3.id, false);
		const d1 = dieIds.get('D-0001')!;
		expect(
			await setPhotoSharing(db, { dieId: d1, publicId: theirs, shared: true, actorId: ADMIN })
		).toMatchObject({ ok: false, status: 404 });
		expect(
			await setPhotoSharing(db, { dieId: d1, publicId: mine, shared: true, actorId: ADMIN })
		).toMatchObject({ ok: true });
		expect((await listSharedPhotos(db, d1)).map((p) => p.publicId)).toEqual([mine]);
		expect(await listSharedPhotos(db, dieIds.get('D-0003')!)).toEqual([]);
		await setPhotoSharing(db, { dieId: d1, publicId: mine, shared: false, actorId: ADMIN });
		expect(await listSharedPhotos(db, d1)).toEqual([]);
		const audit = await db
			.selectFrom('audit_log')
			.select('action')
			.where('action', '=', 'photo.share')
			.execute();
		expect(audit).toHaveLength(2);
	});
});

/** The text a PDF viewer would show: pdfkit writes each run as hex in a TJ array. */
function pdfText(pdf: Buffer): string {
	const raw = pdf.toString('latin1');
	const runs: string[] = [];
	for (const m of raw.matchAll(/\[([^\]]*)\]\s*TJ/g)) {
		for (const h of m[1].matchAll(/<([0-9a-fA-F]*)>/g)) {
			runs.push(Buffer.from(h[1], 'hex').toString('latin1'));
		}
	}
	return runs.join('');
}
