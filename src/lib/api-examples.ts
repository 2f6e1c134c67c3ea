/**
 * The curl examples of the admin API page (/admin/api). They name dies and a press of the demo
 * plant so they answer as shown on a fresh `npm run demo`; `tests/e2e/api-page.spec.ts` runs
 * every one of them with the real curl against the built app, so they cannot rot.
 */
export interface ApiExample {
	id: string;
	title: string;
	/** One sentence on what it shows. */
	note: string;
	method: 'GET' | 'POST';
	/** Path and query under the Castellan address. */
	path: string;
	body?: object;
}

/** The demo die and press the examples use (a ready aluminium die and its cold-chamber press). */
export const EXAMPLE_DIE = 'D-0120';
export const EXAMPLE_PRESS = 'CC-84';

export const API_EXAMPLES: ApiExample[] = [
	{
		id: 'dies',
		title: 'List dies',
		note: 'One page of the register; q searches die number, part, part number and owner.',
		method: 'GET',
		path: '/api/v1/dies?q=LUM&sort=partNumber&size=10'
	},
	{
		id: 'die',
		title: 'One die',
		note: 'Life used of the most-worn half, both halves, the next service.',
		method: 'GET',
		path: `/api/v1/dies/${EXAMPLE_DIE}`
	},
	{
		id: 'shots',
		title: 'Count shots with an idempotency key',
		note: 'Send the same key again (a retry after a timeout) and the shots are not counted twice: the answer says duplicates: 1.',
		method: 'POST',
		path: '/api/v1/shots',
		body: { die: EXAMPLE_DIE, shots: 120, press: EXAMPLE_PRESS, key: `${EXAMPLE_PRESS}-demo-0001` }
	},
	{
		id: 'order-check',
		title: 'Order check',
		note: 'Can the die make 2 000 parts on the press from now? Scrap defaults to 2 % and the rate to the run’s default rate, as on the order-check page.',
		method: 'GET',
		path: `/api/v1/dies/${EXAMPLE_DIE}/order-check?parts=2000&press=${EXAMPLE_PRESS}`
	},
	{
		id: 'openapi',
		title: 'The API description',
		note: 'OpenAPI 3.1, for code generators and API tools.',
		method: 'GET',
		path: '/api/v1/openapi.json'
	}
];

/** The example as a shell command, reading the address and token from the environment. */
export function curlCommand(example: ApiExample): string {
	const lines = ['curl --fail-with-body -sS'];
	if (example.method !== 'GET') lines[0] += ` -X ${example.method}`;
	lines.push('-H "Authorization: Bearer $CASTELLAN_TOKEN"');
	if (example.body) {
		lines.push('-H "Content-Type: application/json"');
		lines.push(`-d '${JSON.stringify(example.body)}'`);
	}
	lines.push(`"$CASTELLAN_URL${example.path}"`);
	return lines.join(' \\\n  ');
}
