// The gateway talks to Castellan only through its public API with a `shots:write` token.
import type { GatewayEntry } from './press-counters';

export interface PostResult {
	/** 'ok': counted (or acknowledged duplicates); 'refused': Castellan named rows it will not take;
	 *  'retry': Castellan unreachable, overloaded or refusing the token — keep everything. */
	kind: 'ok' | 'refused' | 'retry';
	status: number;
	accepted?: number;
	duplicates?: number;
	warnings?: { index: number; message: string }[];
	/** Row index → reason, for 'refused'. */
	refused?: Map<number, string>;
	error?: string;
}

export interface CastellanClient {
	postEntries(entries: GatewayEntry[]): Promise<PostResult>;
	mountedDie(press: string): Promise<string | null | undefined>;
}

/** The body Castellan's shot API takes for one gateway interval. */
export function toApiEntry(e: GatewayEntry) {
	return {
		die: e.die,
		press: e.press,
		shots: e.shots,
		counterStart: e.counterStart,
		counterEnd: e.counterEnd,
		countedAt: e.countedAt,
		key: e.key,
		...(e.resetFrom !== null
			? {
					resetReason: `Press counter reset or rolled over (was ${e.resetFrom}); reported by the press gateway.`
				}
			: {})
	};
}

export function castellanClient(
	baseUrl: string,
	token: string,
	timeoutMs = 15_000
): CastellanClient {
	const base = baseUrl.replace(/\/+$/, '');
	const headers = { authorization: `Bearer ${token}`, 'content-type': 'application/json' };
	return {
		async postEntries(entries) {
			let res: Response;
			try {
				res = await fetch(`${base}/api/v1/shots`, {
					method: 'POST',
					headers,
					body: JSON.stringify(entries.map(toApiEntry)),
					signal: AbortSignal.timeout(timeoutMs)
				});
			} catch (err) {
				return { kind: 'retry', status: 0, error: (err as Error).message };
			}
			const body = (await res.json().catch(() => ({}))) as {
				accepted?: number;
				duplicates?: number;
				warnings?: { index: number; message: string }[];
				issues?: { index: number; field: string; message: string }[];
				error?: string;
			};
			if (res.status === 201 || res.status === 200) {
				return {
					kind: 'ok',
					status: res.status,
					accepted: body.accepted,
					duplicates: body.duplicates,
					warnings: body.warnings ?? []
				};
			}
			if ((res.status === 400 || res.status === 404 || res.status === 409) && entries.length) {
				const refused = new Map<number, string>();
				for (const i of body.issues ?? []) {
					if (i.index >= 0 && i.index < entries.length) {
						refused.set(
							i.index,
							`${refused.has(i.index) ? refused.get(i.index) + ' ' : ''}${i.message}`
						);
					}
				}
				// A single entry answered 404/409 without a row list: that entry is the one refused.
				if (refused.size === 0 && entries.length === 1)
					refused.set(0, body.error ?? `HTTP ${res.status}`);
				if (refused.size)
					return { kind: 'refused', status: res.status, refused, error: body.error };
			}
			return { kind: 'retry', status: res.status, error: body.error ?? `HTTP ${res.status}` };
		},
		async mountedDie(press) {
			try {
				const res = await fetch(`${base}/api/v1/presses/${encodeURIComponent(press)}/mounted`, {
					headers,
					signal: AbortSignal.timeout(timeoutMs)
				});
				if (res.status === 404) return null;
				if (!res.ok) return undefined;
				const body = (await res.json()) as { die?: string | null };
				return body.die ?? null;
			} catch {
				return undefined;
			}
		}
	};
}
