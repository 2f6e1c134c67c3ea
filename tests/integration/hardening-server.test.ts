// Issue 14, items 4 and 10 at the function level: body limits per route and role, the capped
// reader, and the photo folder check made at start and before each photo post.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, test } from 'vitest';
import {
	bodyLimitFor,
	refuseBodyByHeaders,
	SMALL_BODY_BYTES,
	takesPhotos
} from '../../src/lib/server/http/body-limit';
import { readTextCapped } from '../../src/lib/server/http/read-capped';
import { uploadDirProblem } from '../../src/lib/server/photos/upload-dir';

describe('item 4: body limits', () => {
	test('1 MB everywhere; photos only for toolroom workers, the CSV only for shot recorders', () => {
		expect(SMALL_BODY_BYTES).toBe(1_000_000);
		expect(bodyLimitFor(null, null)).toBe(1_000_000);
		expect(bodyLimitFor('/sign-in', null)).toBe(1_000_000);
		expect(bodyLimitFor('/jobs/[job]', null)).toBe(1_000_000);
		expect(bodyLimitFor('/jobs/[job]', 'customer')).toBe(1_000_000);
		expect(bodyLimitFor('/jobs/[job]', 'scheduler')).toBe(1_000_000);
		expect(bodyLimitFor('/jobs/[job]', 'toolmaker')).toBe(220_000_000);
		expect(bodyLimitFor('/dies/[number]/surface', 'toolroom_lead')).toBe(220_000_000);
		expect(bodyLimitFor('/shots/upload', 'scheduler')).toBe(3_000_000);
		expect(bodyLimitFor('/shots/upload', 'toolmaker')).toBe(1_000_000);
		expect(bodyLimitFor('/api/v1/shots', null, true)).toBe(2_000_000);
		expect(bodyLimitFor('/api/v1/shots', null, false)).toBe(1_000_000);
		expect(takesPhotos('/jobs/[job]')).toBe(true);
		expect(takesPhotos('/shots/upload')).toBe(false);
	});

	test('judged on the headers: too long, no valid length, or streamed where only small bodies go', () => {
		const h = (o: Record<string, string>) => new Headers(o);
		expect(refuseBodyByHeaders(h({ 'content-length': '150000000' }), 1_000_000)).toEqual({
			status: 413,
			message: 'The request is too large: the body is larger than 1 MB, the most accepted here.'
		});
		expect(refuseBodyByHeaders(h({ 'content-length': '1000000' }), 1_000_000)).toBeNull();
		expect(refuseBodyByHeaders(h({ 'content-length': 'lots' }), 1_000_000)?.status).toBe(413);
		expect(refuseBodyByHeaders(h({ 'transfer-encoding': 'chunked' }), 1_000_000)?.status).toBe(411);
		expect(refuseBodyByHeaders(h({ 'transfer-encoding': 'chunked' }), 220_000_000)).toBeNull();
	});

	test('the capped reader stops at the cap instead of buffering the rest', async () => {
		let pulled = 0;
		const endless = new ReadableStream<Uint8Array>({
			pull(controller) {
				pulled++;
				controller.enqueue(new Uint8Array(64 * 1024).fill(97));
			}
		});
		const request = new Request('http://x/', {
			method: 'POST',
			body: endless,
			duplex: 'half'
		} as RequestInit);
		expect(await readTextCapped(request, 1_000_000)).toBeNull();
		// 1 MB / 64 KiB = 15.3 chunks: the 16th passes the cap; a few more may be queued ahead.
		expect(pulled).toBeLessThan(20);
		const small = new Request('http://x/', { method: 'POST', body: 'a=1&b=2' });
		expect(await readTextCapped(small, 1_000_000)).toBe('a=1&b=2');
	});
});

describe('item 10: the photo folder is checked before photos arrive', () => {
	test('a writable folder passes (and is created when missing)', () => {
		const dir = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-up-')), 'photos-here');
		expect(uploadDirProblem(dir)).toBeNull();
		expect(fs.existsSync(dir)).toBe(true);
		expect(fs.readdirSync(dir)).toEqual([]);
	});

	test('a folder that cannot be written gives a plain sentence naming it and the cause', () => {
		const base = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-up-'));
		const blocker = path.join(base, 'a-file');
		fs.writeFileSync(blocker, 'not a folder');
		// Below a regular file nothing can be created, even for root.
		const problem = uploadDirProblem(path.join(blocker, 'uploads'));
		expect(problem).toMatch(/^The photo folder .*a-file\/uploads cannot be written \(ENOTDIR\)/);
		expect(problem).toMatch(/Set UPLOAD_DIR/);
	});
});

describe('item 12: the CSV preview stops reading at the row limit', () => {
	test('a 100 000-row file is refused for its rows; a broken line after row 5001 is never reached', async () => {
		const { parseShotCsv } = await import('../../src/lib/server/shots/csv-upload');
		const rows = 'die,counted_at,shots\n' + 'Z,2026-06-10,1\n'.repeat(100_000); // 1.5 MB
		expect(parseShotCsv(rows)).toEqual({
			ok: false,
			message: 'The file has more than 5000 data rows; upload at most 5000 at a time.'
		});
		// An unclosed quote on line 5 003 would stop a reader that parses the whole file first.
		const broken =
			'die,counted_at,shots\n' + 'Z-1,2026-06-10 08:00,1\n'.repeat(5001) + 'Z-1,"2026-06-10,1\n';
		expect(parseShotCsv(broken)).toMatchObject({ ok: false, message: /more than 5000 data rows/ });
	});
});
