import path from 'node:path';
import SQLite from 'better-sqlite3';

// Route ids (`/dies/[number]/jobs`) made concrete with real ids from the e2e database, shared by
// the access matrix and the narrow-screen check.

export type RouteParameters = ReturnType<typeof parameters>;

/** Real ids from the e2e database, so every parameterised route is called with something that exists. */
export function parameters() {
	const db = new SQLite(
		path.resolve(`test-results/e2e-data-${process.env.E2E_PORT ?? 4173}/castellan.db`),
		{ readonly: true }
	);
	const one = <T>(sql: string) => db.prepare(sql).get() as T;
	const values = {
		booking: one<{ id: number }>('select id from press_bookings order by id limit 1').id,
		pressName: one<{ name: string }>('select name from machines order by id limit 1').name,
		press: one<{ id: number }>(
			'select machine_id as id from shot_entries where machine_id is not null group by machine_id order by count(*) desc limit 1'
		).id,
		job: one<{ number: string }>(
			'select toolroom_jobs.number from toolroom_jobs join dies on dies.id = toolroom_jobs.die_id order by toolroom_jobs.id limit 1'
		).number,
		photo: one<{ public_id: string }>(
			"select photos.public_id from photos join dies on dies.id = photos.die_id join customers on customers.id = dies.customer_id where photos.shared_with_owner = 1 and customers.code = 'BRKPUMP' limit 1"
		).public_id
	};
	db.close();
	return values;
}

export function concrete(routeId: string, p: RouteParameters): string {
	let url = routeId
		.replace('/photos/[id]', `/photos/${p.photo}`)
		.replace('/bookings/[id]', `/bookings/${p.booking}`)
		.replace('/presses/[id]', `/presses/${p.press}`)
		.replace('[press]', encodeURIComponent(p.pressName))
		.replace('[number]', 'D-0101')
		.replace('[job]', p.job)
		.replace('[token]', 'no-such-invitation')
		.replace('[variant]', 'thumb');
	if (url.endsWith('/order-check') && url.startsWith('/api')) url += '?parts=10&shotsPerHour=100';
	if (url === '/shots/die-summary') url += '?die=D-0101';
	return url;
}
