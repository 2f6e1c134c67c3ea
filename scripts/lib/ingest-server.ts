// A bare shot-ingest server for the crash-safety and press-gateway scenarios. The
// built SvelteKit app is not there while `npm run test:unit` runs on a fresh machine, so this
// wraps the very function `POST /api/v1/shots` calls — ingestShotBody, and through it
// recordShots — in node:http. Token checks are the access matrix's business, not this one's: every
// request acts as one plant-wide caller.
//   DATABASE_PATH=/tmp/x.db PORT=0 node --import tsx scripts/lib/ingest-server.ts
// Prints `ready <port>` on stdout once it listens. SIGUSR2 arms a SIGKILL of its own right after
// the next batch that commits new entries, before the answer goes out: the crash that an outside
// kill only rarely hits, and the one a retried key exists for.
import http from 'node:http';
import { migrateToLatest, openDatabase } from '../../src/lib/server/db/connect';
import type { LedgerActor } from '../../src/lib/server/shots/ledger';
import { ingestShotBody } from '../../src/lib/server/shots/api-ingest';
import { findMountedDie } from '../../src/lib/server/schedule/press-feed';

/** The same limit as the API route. */
const MAX_BODY_BYTES = 2_000_000;

const file = process.env.DATABASE_PATH;
if (!file) {
	console.error('Error: set DATABASE_PATH to the database file.');
	process.exit(2);
}
const actor: LedgerActor = {
	userId: process.env.INGEST_USER_ID || null,
	tokenId: null,
	customerId: null
};

let dieAfterCommit = false;
process.on('SIGUSR2', () => {
	dieAfterCommit = true;
});

const db = openDatabase(file);
await migrateToLatest(db);

function answer(res: http.ServerResponse, status: number, body: unknown) {
	const text = JSON.stringify(body);
	res.writeHead(status, {
		'content-type': 'application/json',
		'content-length': Buffer.byteLength(text)
	});
	res.end(text);
}

async function readBody(req: http.IncomingMessage): Promise<string | null> {
	const chunks: Buffer[] = [];
	let size = 0;
	for await (const chunk of req as AsyncIterable<Buffer>) {
		size += chunk.length;
		if (size > MAX_BODY_BYTES) return null;
		chunks.push(chunk);
	}
	return Buffer.concat(chunks).toString('utf8');
}

const server = http.createServer(async (req, res) => {
	try {
		// The press gateway's other call: which die is on a press (GET /api/v1/presses/{p}/mounted).
		const mounted = /^\/api\/v1\/presses\/([^/]+)\/mounted$/.exec(req.url ?? '');
		if (req.method === 'GET' && mounted) {
			const found = await findMountedDie(db, decodeURIComponent(mounted[1]));
			return found
				? answer(res, 200, found)
				: answer(res, 404, { error: `There is no press called ${mounted[1]}.` });
		}
		if (req.method !== 'POST' || (req.url !== '/shots' && req.url !== '/api/v1/shots')) {
			return answer(res, 404, { error: 'Only POST /shots (or /api/v1/shots) is served here.' });
		}
		const text = await readBody(req);
		if (text === null) return answer(res, 413, { error: 'The body is too large.' });
		let body: unknown;
		try {
			body = JSON.parse(text);
		} catch {
			return answer(res, 400, { error: 'The body is not valid JSON.' });
		}
		const result = await ingestShotBody(db, body, actor);
		if (dieAfterCommit && result.status === 201 && 'accepted' in result.body) {
			if (result.body.accepted > 0) process.kill(process.pid, 'SIGKILL');
		}
		answer(res, result.status, result.body);
	} catch (err) {
		console.error(err);
		if (!res.headersSent) answer(res, 500, { error: 'Something went wrong on the server.' });
		else res.destroy();
	}
});

server.on('error', (err) => {
	console.error(`Error: ${err.message}`);
	process.exit(1);
});
server.listen(Number(process.env.PORT ?? 0), '127.0.0.1', () => {
	const address = server.address();
	const port = typeof address === 'object' && address ? address.port : 0;
	console.log(`ready ${port}`);
});

// Started by the crash scenario, it must not outlive it: if the test runner is killed or times
// out, the pipe on stdin closes and the server goes with it.
if (process.env.INGEST_EXIT_WITH_PARENT === '1') {
	process.stdin.on('close', () => process.exit(0));
	process.stdin.resume();
}

// A polite stop when asked; the scenario itself stops it with SIGKILL, on purpose.
process.on('SIGTERM', () => {
	server.close();
	void db.destroy().then(() => process.exit(0));
});
