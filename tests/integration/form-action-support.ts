// Calls a route's real form action the way SvelteKit does: a POST with form data, the signed-in
// user in locals, the route params. The app's database is swapped for the test's by the caller's
// vi.mock('$lib/server/db'), so the action, superforms and the schema all run as in production.
import { isActionFailure, isRedirect, type RequestEvent } from '@sveltejs/kit';
import type { RoleName } from '../../src/lib/roles';

export interface ActionUser {
	id: string;
	role: RoleName;
}

export type ActionOutcome =
	| { kind: 'redirect'; location: string }
	| { kind: 'fail'; status: number; data: Record<string, unknown> }
	| { kind: 'ok'; data: Record<string, unknown> };

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Action = (event: any) => unknown;

export async function postAction(
	action: Action | undefined,
	opts: {
		path: string;
		user: ActionUser;
		fields: Record<string, string>;
		params?: Record<string, string>;
	}
): Promise<ActionOutcome> {
	if (!action) throw new Error('No such action');
	const body = new FormData();
	for (const [k, v] of Object.entries(opts.fields)) body.set(k, v);
	const url = new URL(`http://plant.test${opts.path}`);
	const event = {
		request: new Request(url, { method: 'POST', body }),
		url,
		params: opts.params ?? {},
		locals: {
			user: {
				id: opts.user.id,
				role: opts.user.role,
				name: 'Test',
				email: 'test@plant.test',
				customerId: null,
				unitSystem: 'metric'
			},
			session: null
		},
		cookies: { get: () => undefined, set: () => {}, delete: () => {} },
		getClientAddress: () => '127.0.0.1',
		setHeaders: () => {}
	} as unknown as RequestEvent;
	try {
		const result = await action(event);
		if (isActionFailure(result)) {
			return {
				kind: 'fail',
				status: result.status,
				data: (result.data ?? {}) as Record<string, unknown>
			};
		}
		return { kind: 'ok', data: (result ?? {}) as Record<string, unknown> };
	} catch (thrown) {
		if (isRedirect(thrown)) return { kind: 'redirect', location: thrown.location };
		throw thrown;
	}
}

/** The field errors of the superform a failed action returned under `key`. */
export function fieldErrors(outcome: ActionOutcome, key = 'form'): Record<string, string[]> {
	if (outcome.kind === 'redirect') return {};
	const form = outcome.data[key] as { errors?: Record<string, string[]> } | undefined;
	return form?.errors ?? {};
}

/** The message of the superform an action answered with. */
export function formMessage(outcome: ActionOutcome, key = 'form'): string | undefined {
	if (outcome.kind === 'redirect') return undefined;
	const form = outcome.data[key] as { message?: string } | undefined;
	return form?.message;
}
