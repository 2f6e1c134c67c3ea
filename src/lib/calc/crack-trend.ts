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
