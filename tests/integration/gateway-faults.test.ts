// The press gateway end to end under faults (see scripts/lib/gateway-scenario.ts): three fake
// presses on an accelerated clock, a die change, a counter reset, the broker stopped and restarted,
// the gateway SIGKILLed and restarted, Castellan unreachable for a while. Run against the
// in-process aedes broker and against Debian's mosquitto (installed by .ci/run).
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { testEngine } from '../../src/lib/server/db/connect';
import {
	MOSQUITTO,
	runGatewayScenario,
	type GatewayScenarioReport
} from '../../scripts/lib/gateway-scenario';

function expectExactCounts(r: GatewayScenarioReport) {
	const context = `faults: ${r.faults.join('; ')}\ngateway log (last lines):\n${r.gatewayLog.slice(-30).join('\n')}`;
	// Four dies counted: D-9001 then D-9002 on HC-1, D-9003 on HC-2, D-9004 on CC-1.
	expect(
		r.dies.map((d) => d.die),
		context
	).toEqual(['D-9001', 'D-9002', 'D-9003', 'D-9004']);
	for (const d of r.dies) {
		expect(d.truth, `${d.die} ran`).toBeGreaterThan(0);
		expect(d.ledger, `${d.die}: ledger total vs press counters\n${context}`).toBe(d.truth);
	}
	expect(r.keysDuplicated).toBe(0);
	// The counter reset on HC-2 produced entries in the next counter epoch, not negative shots.
	expect(r.resetEntries).toBeGreaterThan(0);
	expect(r.refused, context).toBe(0);
	expect(r.unassigned).toBe(0);
	expect(r.outbox).toBe(0);
	expect(r.faults).toEqual(
		expect.arrayContaining([
			expect.stringContaining('broker stopped'),
			expect.stringContaining('gateway SIGKILLed'),
			expect.stringContaining('Castellan unreachable')
		])
	);
}

// The scenario's Castellan keeps its ledger in a SQLite file of its own (scripts/lib/ingest-server.ts),
// so the PostgreSQL pass would only run the same SQLite scenario a second time. The ledger's
// exactly-once keys on PostgreSQL are tested by shots-two-processes.test.ts (two pools) and
// two-processes.test.ts (two `node build` processes).
describe.skipIf(testEngine() === 'postgres')(
	'press gateway: no lost and no doubled counts across faults',
	() => {
		it('with the in-process broker (aedes)', async () => {
			expectExactCounts(await runGatewayScenario({ broker: 'aedes' }));
		}, 180_000);

		it.skipIf(!fs.existsSync(MOSQUITTO))(
			"with Debian's mosquitto",
			async () => {
				expectExactCounts(await runGatewayScenario({ broker: 'mosquitto' }));
			},
			180_000
		);
	}
);
