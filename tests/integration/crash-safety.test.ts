// Shot ingest survives being killed: 8 clients post keyed batches at once and retry until
// acknowledged while the server (the POST /api/v1/shots code path, see scripts/lib/ingest-server.ts)
// is killed with SIGKILL and restarted 10 times, every other time between a commit and its answer.
// The large run is `npx tsx scripts/bench-crash.ts`.
import { beforeAll, describe, expect, it } from 'vitest';
import { runCrashScenario, type CrashReport } from '../../scripts/lib/crash-scenario';

const CLIENTS = 8;
const KILLS = 10;

let report: CrashReport;

// The scenario cleans up after itself (server killed, temporary folder removed) even when it throws.
beforeAll(async () => {
	report = await runCrashScenario({
		clients: CLIENTS,
		batchesPerClient: 40,
		kills: KILLS,
		seed: 7
	});
}, 180_000);

describe('shot ingest under SIGKILL with retrying clients', () => {
	it('was really killed mid-run, and the server never died on its own', () => {
		expect(report.serverExitedOnItsOwn).toBeNull();
		expect(report.kills).toBe(KILLS);
		expect(report.killSignals).toEqual(Array(KILLS).fill('SIGKILL'));
		// At least one kill cut off requests already sent, so the retries were put to work.
		expect(report.killsInterrupting).toBeGreaterThanOrEqual(1);
		expect(report.networkFailures).toBeGreaterThan(0);
		// And at least one batch was committed but its answer lost: its retry came back as duplicates.
		expect(report.answersLostAfterCommit).toBeGreaterThanOrEqual(1);
	});

	it('acknowledged every batch, refusing none and answering none with a 5xx', () => {
		expect(report.refused).toEqual([]);
		expect(report.serverErrors).toBe(0);
		expect(report.badAcknowledgements).toEqual([]);
		expect(report.resendsAcknowledged).toBeGreaterThan(0);
		expect(report.entriesAcknowledged).toBeGreaterThanOrEqual(CLIENTS * 40);
	});

	it('leaves a database that passes PRAGMA integrity_check and the foreign key check', () => {
		expect(report.integrity).toBe('ok');
		expect(report.foreignKeyProblems).toBe(0);
	});

	it('holds every acknowledged entry exactly once, and nothing else', () => {
		expect(report.keysMissing).toEqual([]);
		expect(report.keysDuplicated).toEqual([]);
		expect(report.keysNeverAcknowledged).toEqual([]);
		expect(report.entriesInLedger).toBe(report.entriesAcknowledged);
	});

	it('keeps die, half and daily totals equal to the ledger sums', () => {
		expect(report.totalsMismatches).toEqual([]);
	});
});
