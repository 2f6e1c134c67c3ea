/**
 * What the service e-mail adds to each die's block besides its notices: surface zones whose
 * latest inspection is grade 3 or worse, and weak cooling circuits. Both come from the same
 * functions as the toolroom home (listRisingSurfaces, listWeakCircuits), so mail and page agree.
 */
import type { DB } from '../db/connect';
import { listWeakCircuits } from '../toolroom/cooling';
import { listRisingSurfaces } from '../toolroom/inspections';

/** Grade from which a crack is named in the e-mail (Castellan scale: open network). */
export const MAIL_CRACK_GRADE = 3;

export interface DieConcerns {
	cracks: { half: 'cover' | 'ejector'; zone: string; grade: number; shotsAt: number }[];
	weakCircuits: { label: string; pctOfNominal: number; leakFailed: boolean }[];
}

export async function findDieConcerns(
	db: DB,
	dieNumbers: readonly string[]
): Promise<Map<string, DieConcerns>> {
	const wanted = new Set(dieNumbers);
	const concerns = new Map<string, DieConcerns>();
	const of = (number: string) => {
		let c = concerns.get(number);
		if (!c) concerns.set(number, (c = { cracks: [], weakCircuits: [] }));
		return c;
	};
	if (wanted.size === 0) return concerns;
	const [surfaces, circuits] = await Promise.all([listRisingSurfaces(db), listWeakCircuits(db)]);
	for (const s of surfaces) {
		if (!wanted.has(s.dieNumber) || s.grade < MAIL_CRACK_GRADE) continue;
		of(s.dieNumber).cracks.push({ half: s.half, zone: s.zone, grade: s.grade, shotsAt: s.shotsAt });
	}
	for (const k of circuits) {
		if (!wanted.has(k.dieNumber)) continue;
		of(k.dieNumber).weakCircuits.push({
			label: k.label,
			pctOfNominal: k.pctOfNominal,
			leakFailed: k.leakTest === 'fail'
		});
	}
	return concerns;
}
