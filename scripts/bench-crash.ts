// Crash safety at size: 8 clients post 500 keyed batches each (1–20 entries) to the shot-ingest
// code path and retry until acknowledged, while the server is killed with SIGKILL and restarted
// 10 times (every other kill between a commit and its answer). The database is then checked as the
// last kill left it. The same scenario runs small in tests/integration/crash-safety.test.ts.
//   npx tsx scripts/bench-crash.ts              (also part of `npm run bench`)
import { runWhenCalledDirectly, type BenchFigure } from './lib/bench-report';
import { runCrashScenario } from './lib/crash-scenario';

const CLIENTS = Number(process.env.BENCH_CRASH_CLIENTS ?? 8);
const BATCHES_PER_CLIENT = Number(process.env.BENCH_CRASH_BATCHES ?? 500);
const KILLS = Number(process.env.BENCH_CRASH_KILLS ?? 10);
/** Ingest while being killed, restarts included; the restarts (a few seconds each under tsx) weigh most. */
const TARGET_ENTRIES_PER_SECOND = 500;

export async function run(): Promise<BenchFigure[]> {
	const r = await runCrashScenario({
		clients: CLIENTS,
		batchesPerClient: BATCHES_PER_CLIENT,
		kills: KILLS,
		seed: 11,
		log: (line) => console.log(line)
	});
	const meanRestart = r.restartMs.reduce((s, ms) => s + ms, 0) / Math.max(1, r.restartMs.length);
	console.log(
		`  ${r.requests} requests, ${r.networkFailures} cut off or refused while down, ` +
			`${r.resendsAcknowledged} whole batches resent, mean restart ${(meanRestart / 1000).toFixed(1)} s`
	);
	if (r.serverExitedOnItsOwn) console.log(`  server died on its own: ${r.serverExitedOnItsOwn}`);
	for (const problem of [
		...r.refused,
		...r.badAcknowledgements,
		...r.keysMissing.map((k) => `missing ${k}`),
		...r.keysDuplicated.map((k) => `twice ${k}`),
		...r.keysNeverAcknowledged.map((k) => `never acknowledged ${k}`),
		...r.totalsMismatches
	].slice(0, 20)) {
		console.log(`  problem: ${problem}`);
	}
	const allAcknowledged =
		r.refused.length === 0 &&
		!r.serverExitedOnItsOwn &&
		r.entriesInLedger === r.entriesAcknowledged;
	const totalsMismatches = r.totalsMismatches.length + r.badAcknowledgements.length;
	const rate = r.entriesAcknowledged / r.seconds;
	return [
		{
			figure: 'crash: entries acknowledged (all in the ledger)',
			value: r.entriesAcknowledged,
			unit: 'entries',
			target: `every batch of ${r.batches}, = ledger rows`,
			pass: allAcknowledged && r.missingCount === 0
		},
		{
			figure: 'crash: kills landing mid-request',
			value: r.killsInterrupting,
			unit: 'kills',
			target: `${KILLS} SIGKILLs, ≥ 1 mid-request`,
			pass:
				r.kills === KILLS && r.killSignals.every((s) => s === 'SIGKILL') && r.killsInterrupting >= 1
		},
		{
			figure: 'crash: committed batches whose answer was lost, retried as duplicates',
			value: r.answersLostAfterCommit,
			unit: 'batches',
			target: '≥ 1',
			pass: r.answersLostAfterCommit >= 1
		},
		{
			figure: 'crash: keys found twice or never acknowledged',
			value: r.duplicatedCount + r.neverAcknowledgedCount,
			unit: 'keys',
			target: '0',
			pass: r.duplicatedCount + r.neverAcknowledgedCount === 0
		},
		{
			figure: 'crash: PRAGMA integrity_check ok (1 = ok)',
			value: r.integrity === 'ok' && r.foreignKeyProblems === 0 ? 1 : 0,
			unit: '',
			target: '1',
			pass: r.integrity === 'ok' && r.foreignKeyProblems === 0
		},
		{
			figure: 'crash: totals not equal to ledger sums',
			value: totalsMismatches,
			unit: 'mismatches',
			target: '0',
			pass: totalsMismatches === 0
		},
		{
			figure: 'crash: entries/s while being killed',
			value: rate,
			unit: 'entries/s',
			target: `≥ ${TARGET_ENTRIES_PER_SECOND}`,
			ratio: rate / TARGET_ENTRIES_PER_SECOND,
			pass: rate >= TARGET_ENTRIES_PER_SECOND
		}
	];
}

await runWhenCalledDirectly(import.meta.url, run);
