export interface OrderCheckInput {
	/** Good parts ordered. */
	parts: number;
	/** Cavities in the die (parts per shot). */
	cavities: number;
	/** Expected scrap, percent of parts cast (0 ≤ scrap < 100). */
	scrapPct: number;
	/** Press rate, shots per hour. */
	shotsPerHour: number;
	/** Shots until the next service task falls due; null when the die has no task. */
	shotsToNextService: number | null;
	/** Shots until the die reaches its expected life; null when unknown. */
	shotsToEndOfLife: number | null;
}

export type OrderLimit = 'service' | 'end_of_life';

export interface OrderCheck {
	/** Shots needed for the order, scrap included. */
	shotsNeeded: number;
	/** Press time for those shots, hours. */
	pressHours: number;
	/** True when the order runs before any limit is reached. */
	fits: boolean;
	/** The limit reached first when the order does not fit; null when it fits. */
	blockedBy: OrderLimit | null;
	/** Shots beyond that limit; 0 when the order fits. */
	shotsShort: number;
}

/**
 * Whether an order fits before the die's next service task and its end of life.
 * shotsNeeded = ⌈parts / (cavities × (1 − scrap/100))⌉, press hours = shots / (shots per hour).
 * Plain arithmetic, no published source. A limit already passed (negative) counts as 0; when
 * both limits are equal, end of life is reported.
 */
export function checkOrder(input: OrderCheckInput): OrderCheck {
	const { parts, cavities, scrapPct, shotsPerHour, shotsToNextService, shotsToEndOfLife } = input;
	if (!Number.isInteger(parts) || parts < 1) {
		throw new RangeError('Parts must be a whole number of at least 1.');
	}
	if (!Number.isInteger(cavities) || cavities < 1) {
		throw new RangeError('Cavities must be a whole number of at least 1.');
	}
	if (!(scrapPct >= 0 && scrapPct < 100)) {
		throw new RangeError('Scrap must be at least 0 % and below 100 %.');
	}
	if (!(shotsPerHour > 0) || !Number.isFinite(shotsPerHour)) {
		throw new RangeError('Shots per hour must be more than 0.');
	}
	for (const limit of [shotsToNextService, shotsToEndOfLife]) {
		if (limit !== null && Number.isNaN(limit)) {
			throw new RangeError('Shots to the next service and to end of life must be numbers.');
		}
	}

	// Written as parts·100 / (cavities·(100 − scrap)) so whole-number inputs stay exact; the small
	// allowance keeps a rounding crumb from adding a whole shot.
	const exact = (parts * 100) / (cavities * (100 - scrapPct));
	const shotsNeeded = Math.ceil(exact - 1e-9);
	const pressHours = shotsNeeded / shotsPerHour;

	const limits: { kind: OrderLimit; shots: number }[] = [];
	if (shotsToEndOfLife !== null)
		limits.push({ kind: 'end_of_life', shots: Math.max(0, shotsToEndOfLife) });
	if (shotsToNextService !== null)
		limits.push({ kind: 'service', shots: Math.max(0, shotsToNextService) });
	// Stable sort: on a tie the end of life (pushed first) wins.
	limits.sort((a, b) => a.shots - b.shots);
	const first = limits[0];

	if (first === undefined || shotsNeeded <= first.shots) {
		return { shotsNeeded, pressHours, fits: true, blockedBy: null, shotsShort: 0 };
	}
	return {
		shotsNeeded,
		pressHours,
		fits: false,
		blockedBy: first.kind,
		shotsShort: shotsNeeded - first.shots
	};
}
