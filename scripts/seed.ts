import { DEMO_PASSWORD, DEMO_USERS, isEmpty, seedDemo } from './lib/demo-scenario';
import { databasePath, openMigratedDatabase } from './lib/cli';

const db = await openMigratedDatabase();
if (!(await isEmpty(db))) {
	console.log(
		`Database ${databasePath()} already has users; the demo scenario is not added twice.`
	);
} else {
	const started = Date.now();
	const s = await seedDemo(db);
	console.log(
		`Seeded ${s.dies} dies and ${s.entries} ledger entries in ${((Date.now() - started) / 1000).toFixed(1)} s.`
	);
	console.log(`Sign in with any of these (password ${DEMO_PASSWORD}):`);
	for (const u of DEMO_USERS) console.log(`  ${u.role.padEnd(14)} ${u.email}`);
}
await db.destroy();
