import type { Kysely } from 'kysely';

// eslint-disable-next-line @typescript-eslint/no-unused-vars, @typescript-eslint/no-explicit-any
export async function up(db: Kysely<any>): Promise<void> {}

// eslint-disable-next-line @typescript-eslint/no-unused-vars, @typescript-eslint/no-explicit-any
export async function down(db: Kysely<any>): Promise<void> {}
