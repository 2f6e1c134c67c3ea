// One command for a fresh machine: build if needed, migrate, seed the invented demo plant when the
// database is empty, start the fake mail server and the app, and print a sign-in for every role.
import { execSync, spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fakeMailPortsFromEnv, startFakeMail } from '../fakes/mail/server';
import { startDemoPresses, type DemoPresses } from '../fakes/press/demo-plant';
import { fakeS3OptionsFromEnv, startFakeS3, type FakeS3 } from '../fakes/s3/server';
import { createApiToken, revokeApiToken } from '../src/lib/server/auth/tokens';
import { DEMO_PASSWORD, DEMO_PLANT, DEMO_USERS, isEmpty, seedDemo } from './lib/demo-scenario';
import { databasePath, openMigratedDatabase } from './lib/cli';

const port = process.env.PORT ?? '3000';
const origin = process.env.ORIGIN ?? `http://localhost:${port}`;

function newestMtime(dir: string): number {
	let newest = 0;
	for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
		const p = path.join(dir, entry.name);
		newest = Math.max(newest, entry.isDirectory() ? newestMtime(p) : fs.statSync(p).mtimeMs);
	}
	return newest;
}

const built = fs.existsSync('build/index.js') ? fs.statSync('build/index.js').mtimeMs : 0;
if (built < Math.max(newestMtime('src'), newestMtime('migrations'))) {
	console.log('Building Castellan (vite build)…');
	execSync('npx vite build --logLevel error', { stdio: ['ignore', 'ignore', 'inherit'] });
}

// PHOTO_STORE=s3 without an S3_ENDPOINT of its own: photos go to a fake S3 started here (before
// seeding, which stores the demo's photos). Without PHOTO_STORE the photos stay in UPLOAD_DIR.
let fakeS3: FakeS3 | null = null;
if (process.env.PHOTO_STORE === 's3' && !process.env.S3_ENDPOINT) {
	const options = fakeS3OptionsFromEnv();
	fakeS3 = await startFakeS3(options);
	Object.assign(process.env, fakeS3.env);
}

const db = await openMigratedDatabase();
if (await isEmpty(db)) {
	console.log(`Seeding the invented demo plant "${DEMO_PLANT}" into ${databasePath()}…`);
	const s = await seedDemo(db);
	console.log(
		`  ${s.dies} dies, ${s.entries} ledger entries. Demo API token (shots:write, dies:read):\n  ${s.token}`
	);
}
// The demo presses' gateway gets a fresh token each start (the secret is never stored in clear).
const GATEWAY_TOKEN_NAME = 'Demo press gateway (npm run demo)';
const demoPressesOn = (process.env.DEMO_PRESSES ?? 'on') !== 'off';
let gatewayToken: string | null = null;
if (demoPressesOn) {
	const old = await db
		.selectFrom('api_tokens')
		.select('id')
		.where('name', '=', GATEWAY_TOKEN_NAME)
		.where('revoked_at', 'is', null)
		.execute();
	for (const t of old) await revokeApiToken(db, t.id);
	const admin = await db
		.selectFrom('users')
		.select('id')
		.where('role', '=', 'admin')
		.executeTakeFirst();
	gatewayToken = (
		await createApiToken(db, {
			name: GATEWAY_TOKEN_NAME,
			scopes: ['shots:write'],
			customerId: null,
			createdBy: admin?.id ?? null
		})
	).token;
}
await db.destroy();

let mail: Awaited<ReturnType<typeof startFakeMail>> | null = null;
try {
	mail = await startFakeMail(fakeMailPortsFromEnv());
} catch (err) {
	console.warn(`Fake mail server not started (${(err as Error).message}); is one already running?`);
}

const app = spawn(process.execPath, ['scripts/start.js'], {
	stdio: 'inherit',
	env: {
		...process.env,
		PORT: port,
		ORIGIN: origin,
		DATABASE_PATH: databasePath(),
		UPLOAD_DIR: process.env.UPLOAD_DIR ?? './data/uploads',
		// The app mails the fake on the port it really listens on (FAKE_MAIL_SMTP_PORT honoured).
		SMTP_URL:
			process.env.SMTP_URL ??
			`smtp://127.0.0.1:${mail?.smtpPort ?? fakeMailPortsFromEnv().smtpPort}`
	}
});

let presses: DemoPresses | null = null;
if (gatewayToken) {
	const mqttPort = Number(process.env.DEMO_MQTT_PORT ?? 1884);
	try {
		presses = await startDemoPresses({
			databasePath: databasePath(),
			castellanUrl: `http://127.0.0.1:${port}`,
			token: gatewayToken,
			mqttPort,
			stateFile: path.join(path.dirname(databasePath()), 'press-gateway.json')
		});
	} catch (err) {
		console.warn(
			`Demo presses not started (${(err as Error).message}); is port ${mqttPort} in use? Set DEMO_MQTT_PORT or DEMO_PRESSES=off.`
		);
	}
}

console.log(`\nCastellan demo: ${origin}`);
if (presses) {
	console.log(
		`Demo presses on MQTT ${presses.broker.url} (${presses.presses.map((p) => `${p.press}: ${p.die}`).join(', ')}); counts reach the ledger every 30 s.`
	);
}
if (fakeS3) console.log(`Fake S3 for photos: ${fakeS3.endpoint}, bucket ${fakeS3.bucket}`);
if (mail)
	console.log(
		`Fake mail inbox: http://127.0.0.1:${mail.httpPort} (SMTP on 127.0.0.1:${mail.smtpPort})`
	);
console.log(`Sign in as any of these, password "${DEMO_PASSWORD}":`);
for (const u of DEMO_USERS) console.log(`  ${u.role.padEnd(14)} ${u.email}`);
console.log('Stop with Ctrl+C.\n');

const closeFakes = async () => {
	await presses?.close();
	await mail?.close();
	await fakeS3?.close();
};
const stop = async () => {
	app.kill('SIGTERM');
	await closeFakes();
	process.exit(0);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
app.on('exit', async (code) => {
	await closeFakes();
	process.exit(code ?? 0);
});
