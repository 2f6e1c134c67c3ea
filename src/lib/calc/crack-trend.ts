/** Castellan's surface grades for heat checking, 0 (none) to 4 (repair before production). */
export const SURFACE_GRADES = [
	{ grade: 0, description: 'No visible checking' },
	{ grade: 1, description: 'Isolated fine hairlines' },
	{ grade: 2, description: 'Local crack network, tight' },
	{ grade: 3, description: 'Open network across a functional surface' },
	{
		grade: 4,
		description: 'Deep or open cracks that mark the casting — repair before further production'
	}
] as const;

export type SurfaceGrade = (typeof SURFACE_GRADES)[number]['grade'];

/** Default grade at which the plant repairs a die surface. */
export const DEFAULT_REPAIR_GRADE = 3;

export interface CrackTrend {
	/** Grades per shot from the least-squares line; null with fewer than 3 distinct shot counts. */
	slopePerShot: number | null;
	/** Grade at 0 shots from the line; null with fewer than 3 distinct shot counts. */
	intercept: number | null;
	/**
	 * Shot count (rounded up) at which the line reaches the repair grade, never before the latest
	 * inspection; the latest inspection's shots when it is already at or above the repair grade;
	 * null when there is no trend or it is not rising.
	 */
	projectedShotsAtRepair: number | null;
}

/**
 * Least-squares line of surface grade against shots (ordinary least squares, any statistics
 * text) and the shot count at which it reaches `repairGrade` (default 3).
 */
export function crackTrend(
	points: readonly { shots: number; grade: number }[],
	repairGrade = DEFAULT_REPAIR_GRADE
): CrackTrend {
	if (!(repairGrade > 0 && repairGrade <= 4)) {
		throw new RangeError('The repair grade must be above 0 and at most 4.');
	}
	for (const p of points) {
		if (!(p.shots >= 0) || !Number.isFinite(p.shots)) {
			throw new RangeError('Shot counts must be zero or more.');
		}
		if (!(p.grade >= 0 && p.grade <= 4)) throw new RangeError('Surface grades run from 0 to 4.');
	}
	const none: CrackTrend = { slopePerShot: null, intercept: null, projectedShotsAtRepair: null };
	if (points.length === 0) return none;

	// Latest inspection: the most shots; on equal shots the later entry.
	let latest = points[0];
	for (const p of points) if (p.shots >= latest.shots) latest = p;

	const distinctShots = new Set(points.map((p) => p.shots)).size;
	let slopePerShot: number | null = null;
	let intercept: number | null = null;
	if (distinctShots >= 3) {
		const n = points.length;
		const meanX = points.reduce((s, p) => s + p.shots, 0) / n;
		const meanY = points.reduce((s, p) => s + p.grade, 0) / n;
		let sxy = 0;
		let sxx = 0;
		for (const p of points) {
			sxy += (p.shots - meanX) * (p.grade - meanY);
			sxx += (p.shots - meanX) ** 2;
		}
		slopePerShot = sxy / sxx;
		intercept = meanY - slopePerShot * meanX;
	}

	let projectedShotsAtRepair: number | null = null;
	if (latest.grade >= repairGrade) {
		projectedShotsAtRepair = latest.shots;
	} else if (slopePerShot !== null && intercept !== null && slopePerShot > 0) {
		const atRepair = (repairGrade - intercept) / slopePerShot;
		// The allowance stops a rounding crumb from adding a whole shot to an exact answer.
		projectedShotsAtRepair = Math.max(latest.shots, Math.ceil(atRepair - 1e-6));
	}
	return { slopePerShot, intercept, projectedShotsAtRepair };
}

/** One surface inspection of a zone, as the series split needs it. */
export interface CrackPoint {
	/** Die shots at the inspection. */
	shots: number;
	grade: number;
	longestCrackMm: number | null;
	/** When the inspection was made (ISO-8601 UTC). */
	at: string;
	/** The physical half inspected (by serial); null when not known. */
	halfSerial: string | null;
}

/** A repair that touched the zone (weld, insert change, re-machining), when the job closed. */
export interface ZoneRepair {
	at: string;
	kind: string;
	shots: number | null;
}

export interface CrackSeries<P extends CrackPoint = CrackPoint> {
	halfSerial: string | null;
	/** Why this series starts: the first ever, a repair of the zone, or another half fitted. */
	startedBy: { kind: 'first' } | { kind: 'repair'; repair: ZoneRepair } | { kind: 'new_half' };
	points: P[];
	trend: CrackTrend;
	/** True for the series after the latest restart: the one that projects the next repair. */
	current: boolean;
}

/**
 * Splits a zone's inspections into series: a series belongs to one physical half and restarts
 * after a repair that touched the zone or when another half is fitted, so a fitted line never
 * mixes worn and repaired steel. Inspections are taken in time order; an inspection made after a
 * repair's close belongs to the new series. Each series gets its own least-squares trend.
 */
export function splitCrackSeries<P extends CrackPoint>(
	points: readonly P[],
	repairs: readonly ZoneRepair[],
	repairGrade = DEFAULT_REPAIR_GRADE
): CrackSeries<P>[] {
	const ordered = [...points].sort((a, b) => a.at.localeCompare(b.at) || a.shots - b.shots);
	const fixes = [...repairs].sort((a, b) => a.at.localeCompare(b.at));
	const series: { halfSerial: string | null; startedBy: CrackSeries['startedBy']; points: P[] }[] =
		[];
	let fixIndex = 0;
	for (const p of ordered) {
		let repair: ZoneRepair | null = null;
		while (fixIndex < fixes.length && fixes[fixIndex].at <= p.at) repair = fixes[fixIndex++];
		const last = series[series.length - 1];
		if (!last) {
			series.push({ halfSerial: p.halfSerial, startedBy: { kind: 'first' }, points: [p] });
		} else if (repair) {
			series.push({ halfSerial: p.halfSerial, startedBy: { kind: 'repair', repair }, points: [p] });
		} else if (p.halfSerial !== last.halfSerial) {
			series.push({ halfSerial: p.halfSerial, startedBy: { kind: 'new_half' }, points: [p] });
		} else {
			last.points.push(p);
		}
	}
	return series.map((s, i) => ({
		...s,
		trend: crackTrend(
			s.points.map((p) => ({ shots: p.shots, grade: p.grade })),
			repairGrade
		),
		current: i === series.length - 1
	}));
}
