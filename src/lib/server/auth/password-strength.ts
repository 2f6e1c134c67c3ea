import { ZxcvbnFactory } from '@zxcvbn-ts/core';
import { adjacencyGraphs, dictionary } from '@zxcvbn-ts/language-common';

/**
 * zxcvbn's score 0–4 (Dropbox's estimator, ported as @zxcvbn-ts): 3 = "safely unguessable:
 * moderate protection from offline slow-hash scenario" (score table in the zxcvbn README).
 */
export const MIN_PASSWORD_SCORE = 3;

let factory: ZxcvbnFactory | undefined;
const estimator = () =>
	(factory ??= new ZxcvbnFactory({ dictionary: { ...dictionary }, graphs: adjacencyGraphs }));

/**
 * Why this password is refused, in a sentence for the form, or null when it is strong enough.
 * `related` are things an attacker knows about the account (e-mail, name, plant) and tries first.
 */
export function passwordWeakness(password: string, related: string[] = []): string | null {
	const words = related
		.flatMap((r) => r.toLowerCase().split(/[^a-z0-9]+/))
		.filter((w) => w.length > 2);
	const result = estimator().check(password, words);
	if (result.score >= MIN_PASSWORD_SCORE) return null;
	const patterns = new Set(result.sequence.map((m) => m.pattern));
	const why = patterns.has('repeat')
		? 'it repeats the same characters'
		: patterns.has('sequence')
			? 'it follows a sequence such as abcd or 1234'
			: patterns.has('spatial')
				? 'it follows a keyboard pattern'
				: patterns.has('date')
					? 'it is built on a date'
					: patterns.has('dictionary')
						? 'it is built from common words, names or your own details'
						: 'it is short and simple';
	return `This password is too easy to guess: ${why}. Use a longer phrase of four or more unrelated words.`;
}
