import { databasePath, openMigratedDatabase } from './lib/cli';

const db = await openMigratedDatabase();
console.log(`Database ${databasePath()} is at the latest migration.`);
await db.destroy();
