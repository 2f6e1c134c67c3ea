import { openMigratedDatabase, shownTarget } from './lib/cli';

const db = await openMigratedDatabase();
console.log(`Database ${shownTarget()} is at the latest migration.`);
await db.destroy();
