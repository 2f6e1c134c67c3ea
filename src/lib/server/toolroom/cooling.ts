/**
 * Cooling circuits and their checks, with the figures from calc/cooling.ts (water by IAPWS, oil
 * by its data sheet — never water formulas for oil) and the die heat balance from
 * calc/heat-balance.ts. Figures are planning aids.
 */
import {
	flowPercentOfNominal,
	flowRegime,
	flowVelocity,
	heatRemovedKw,
	heatRemovedKwFor,
	reynoldsNumber,
	reynoldsNumberFor,
	WEAK_FLOW_THRESHOLD_PCT,
	type FlowRegime
} from '../../calc/cooling';
import { dieHeatBalance, heatPerShotKj, type HeatBalance } from '../../calc/heat-balance';
import type { CircuitForm, CoolingCheckForm, HeatBalanceQuery } from '../../schemas/toolroom';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { findTaskToComplete, type TaskOffer } from '../dies/service-plan';
import type { Coolant } from '../db/schema-toolroom';
import { nowIso } from '../time';
import { canLeadToolroom, canWorkToolroom } from './access';
import { isOpenJobOfDie, type Actor } from './jobs';

/** Water temperatures the IAPWS properties are used for here, °C (pressurised above 100 °C). */
export const WATER_CHECK_RANGE_C = { min: 1, max: 180 } as const;

export type CoolingRefusal = {
	ok: false;
	status: 400 | 403 | 404 | 409;
	field?: string;
	message: string;
};

/**
 * Who may change a die's circuit list: toolmakers, the lead and admins, unless the lead has
 * locked the list, which then only the lead (or an admin) changes. Null when allowed.
 */
async function circuitListRefusal(
	db: DB,
	dieId: number,
	actor: Actor
): Promise<CoolingRefusal | null> {
	if (!canWorkToolroom(actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not change cooling circuits.' };
	}
	const die = await db
		.selectFrom('dies')
		.select(['cooling_locked'])
		.where('id', '=', dieId)
		.executeTakeFirst();
	if (!die) return { ok: false, status: 404, message: 'There is no such die.' };
	if (die.cooling_locked === 1 && !canLeadToolroom(actor.role)) {
		return {
			ok: false,
			status: 403,
			message: 'The toolroom lead has locked this die’s circuit list. Ask the lead to change it.'
		};
	}
	return null;
}

/** Adds a cooling circuit to a die (toolmaker, lead or admin; the lead alone when locked). */
export async function addCircuit(
	db: DB,
	input: { dieId: number; form: CircuitForm; actor: Actor; at?: string }
): Promise<{ ok: true; id: number } | CoolingRefusal> {
	return saveCircuit(db, { ...input, circuitId: null });
}

/** Changes a circuit's half, label, coolant, diameter or nominal flow; checks keep their figures. */
export async function editCircuit(
	db: DB,
	input: { dieId: number; circuitId: number; form: CircuitForm; actor: Actor; at?: string }
): Promise<{ ok: true; id: number } | CoolingRefusal> {
	return saveCircuit(db, input);
}

async function saveCircuit(
	db: DB,
	input: { dieId: number; circuitId: number | null; form: CircuitForm; actor: Actor; at?: string }
): Promise<{ ok: true; id: number } | CoolingRefusal> {
	const { form, actor, circuitId } = input;
	const at = input.at ?? nowIso();
	const refusal = await circuitListRefusal(db, input.dieId, actor);
	if (refusal) return refusal;
	return writeTransaction(db, async (trx) => {
		const before = circuitId
			? await trx
					.selectFrom('cooling_circuits')
					.selectAll()
					.where('id', '=', circuitId)
					.where('die_id', '=', input.dieId)
					.executeTakeFirst()
			: null;
		if (circuitId && !before) {
			return { ok: false, status: 404, message: 'This die has no such circuit.' } as const;
		}
		const clash = await trx
			.selectFrom('cooling_circuits')
			.select('id')
			.where('die_id', '=', input.dieId)
			.where('label', '=', form.label)
			.$if(!!circuitId, (q) => q.where('id', '!=', circuitId!))
			.executeTakeFirst();
		if (clash) {
			return {
				ok: false,
				status: 409,
				field: 'label',
				message: `This die already has a circuit labelled “${form.label}”.`
			} as const;
		}
		const values = {
			half: form.half,
			label: form.label,
			coolant: form.coolant,
			channel_diameter_mm: form.channelDiameterMm,
			nominal_flow_lpm: form.nominalFlowLpm
		};
		let id: number;
		if (before) {
			await trx.updateTable('cooling_circuits').set(values).where('id', '=', before.id).execute();
			id = before.id;
		} else {
			const row = await trx
				.insertInto('cooling_circuits')
				.values({ ...values, die_id: input.dieId, created_by: actor.userId, created_at: at })
				.returning('id')
				.executeTakeFirstOrThrow();
			id = row.id;
		}
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				action: before ? 'cooling.circuit.edit' : 'cooling.circuit',
				dieId: input.dieId,
				detail: before
					? {
							label: form.label,
							from: {
								label: before.label,
								half: before.half,
								coolant: before.coolant,
								diameterMm: before.channel_diameter_mm,
								nominalLpm: before.nominal_flow_lpm
							},
							to: {
								label: form.label,
								half: form.half,
								coolant: form.coolant,
								diameterMm: form.channelDiameterMm,
								nominalLpm: form.nominalFlowLpm
							}
						}
					: { label: form.label, coolant: form.coolant, nominalLpm: form.nominalFlowLpm }
			},
			at
		);
		return { ok: true, id } as const;
	});
}

/** Locks or unlocks a die's circuit list (toolroom lead or admin). */
export async function setCoolingLock(
	db: DB,
	input: { dieId: number; locked: boolean; actor: Actor; at?: string }
): Promise<{ ok: true } | CoolingRefusal> {
	if (!canLeadToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Only the toolroom lead may lock the circuit list.' };
	}
	const at = input.at ?? nowIso();
	await writeTransaction(db, async (trx) => {
		await trx
			.updateTable('dies')
			.set({ cooling_locked: input.locked ? 1 : 0 })
			.where('id', '=', input.dieId)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: input.locked ? 'cooling.lock' : 'cooling.unlock',
				dieId: input.dieId,
				detail: {}
			},
			at
		);
	});
	return { ok: true };
}

export interface CheckFigures {
	pctOfNominal: number;
	weak: boolean;
	velocityMs: number;
	reynolds: number | null;
	regime: FlowRegime | null;
	heatKw: number | null;
	/** Why a figure could not be worked out (e.g. a temperature outside the water tables). */
	problem: string | null;
}

type CheckValues = {
	measured_flow_lpm: number;
	inlet_c: number;
	outlet_c: number;
	oil_density_kg_m3: number | null;
	oil_viscosity_mpa_s: number | null;
	oil_specific_heat_j_kgk: number | null;
};
type CircuitValues = { coolant: Coolant; channel_diameter_mm: number; nominal_flow_lpm: number };

/** % of nominal, velocity, Reynolds number and regime, heat removed — for one check. */
export function evaluateCheck(circuit: CircuitValues, check: CheckValues): CheckFigures {
	const flowLpm = check.measured_flow_lpm;
	const diameterMm = circuit.channel_diameter_mm;
	const pctOfNominal = flowPercentOfNominal(flowLpm, circuit.nominal_flow_lpm);
	const figures: CheckFigures = {
		pctOfNominal,
		weak: pctOfNominal < WEAK_FLOW_THRESHOLD_PCT,
		velocityMs: flowVelocity({ flowLpm, diameterMm }),
		reynolds: null,
		regime: null,
		heatKw: null,
		problem: null
	};
	const meanC = (check.inlet_c + check.outlet_c) / 2;
	try {
		if (circuit.coolant === 'oil') {
			const density = check.oil_density_kg_m3;
			const viscosityMpaS = check.oil_viscosity_mpa_s;
			const specificHeat = check.oil_specific_heat_j_kgk;
			if (density === null || viscosityMpaS === null || specificHeat === null) {
				figures.problem = 'Oil properties missing: Reynolds number and heat not worked out.';
				return figures;
			}
			figures.reynolds = reynoldsNumberFor({
				flowLpm,
				diameterMm,
				density,
				viscosity: viscosityMpaS / 1000
			});
			figures.heatKw = heatRemovedKwFor({
				flowLpm,
				inletC: check.inlet_c,
				outletC: check.outlet_c,
				density,
				specificHeat
			});
		} else {
			figures.reynolds = reynoldsNumber({ flowLpm, diameterMm, tempC: meanC });
			figures.heatKw = heatRemovedKw({ flowLpm, inletC: check.inlet_c, outletC: check.outlet_c });
		}
		figures.regime = flowRegime(figures.reynolds);
	} catch (error) {
		if (!(error instanceof RangeError)) throw error;
		figures.problem = error.message;
	}
	return figures;
}

/** Flow above this multiple of the nominal flow is not believed without a stated reason. */
export const MAX_PLAUSIBLE_FLOW_RATIO = 3;
const MIN_REASON = 5;

type CircuitRow = CircuitValues & { id: number; label: string };

async function findCircuit(db: DB, dieId: number, circuitId: number) {
	return db
		.selectFrom('cooling_circuits')
		.select(['id', 'label', 'coolant', 'channel_diameter_mm', 'nominal_flow_lpm'])
		.where('id', '=', circuitId)
		.where('die_id', '=', dieId)
		.where('active', '=', 1)
		.executeTakeFirst();
}

/**
 * What is unusual about a reading: an outlet not warmer than the inlet (the circuit took no heat
 * out, or the thermometers or hoses are swapped), or flow above 3× nominal (often a typing slip,
 * e.g. 185 for 18.5). Either can happen in practice (a die on preheat, a circuit re-bored), so
 * each needs a confirmed reason rather than a flat refusal.
 */
export function unusualReadings(circuit: CircuitValues, form: CoolingCheckForm): string[] {
	const found: string[] = [];
	if (form.outletC <= form.inletC) {
		found.push(
			`the outlet (${form.outletC} °C) is not warmer than the inlet (${form.inletC} °C), so the circuit took no heat out of the die — check the thermometers and that the hoses are not swapped`
		);
	}
	if (form.measuredFlowLpm > MAX_PLAUSIBLE_FLOW_RATIO * circuit.nominal_flow_lpm) {
		found.push(
			`the flow (${form.measuredFlowLpm} L/min) is more than ${MAX_PLAUSIBLE_FLOW_RATIO}× the nominal ${circuit.nominal_flow_lpm} L/min — check the reading and the decimal mark`
		);
	}
	return found;
}

/** The row values of a reading, or why it cannot be recorded as it stands. */
function readCheck(
	circuit: CircuitRow,
	form: CoolingCheckForm
): { ok: true; values: CheckValues & { unusual_reason: string | null } } | CoolingRefusal {
	const isOil = circuit.coolant === 'oil';
	if (isOil) {
		const missing = (
			[
				['oilDensityKgM3', form.oilDensityKgM3, 'Enter the oil density (data sheet), kg/m³.'],
				[
					'oilViscosityMpaS',
					form.oilViscosityMpaS,
					'Enter the oil viscosity at working temperature, mPa·s.'
				],
				[
					'oilSpecificHeatJKgK',
					form.oilSpecificHeatJKgK,
					'Enter the oil’s specific heat, J/(kg·K).'
				]
			] as const
		).find(([, value]) => value === null);
		if (missing) return { ok: false, status: 400, field: missing[0], message: missing[2] };
	} else {
		for (const [field, value] of [
			['inletC', form.inletC],
			['outletC', form.outletC]
		] as const) {
			if (value < WATER_CHECK_RANGE_C.min || value > WATER_CHECK_RANGE_C.max) {
				return {
					ok: false,
					status: 400,
					field,
					message: `Water circuits: ${WATER_CHECK_RANGE_C.min}–${WATER_CHECK_RANGE_C.max} °C.`
				};
			}
		}
	}
	const unusual = unusualReadings(circuit, form);
	const reason = form.unusualReason?.trim() ?? '';
	if (unusual.length > 0 && reason.length < MIN_REASON) {
		return {
			ok: false,
			status: 400,
			field: 'unusualReason',
			message: `Not recorded: ${unusual.join('; and ')}. If the reading is right, say why here (at least ${MIN_REASON} characters) and record it again.`
		};
	}
	return {
		ok: true,
		values: {
			measured_flow_lpm: form.measuredFlowLpm,
			inlet_c: form.inletC,
			outlet_c: form.outletC,
			oil_density_kg_m3: isOil ? form.oilDensityKgM3 : null,
			oil_viscosity_mpa_s: isOil ? form.oilViscosityMpaS : null,
			oil_specific_heat_j_kgk: isOil ? form.oilSpecificHeatJKgK : null,
			unusual_reason: unusual.length > 0 ? reason : null
		}
	};
}

/** Records a check of one circuit of this die; oil circuits need the oil's properties. */
export async function recordCheck(
	db: DB,
	input: { dieId: number; form: CoolingCheckForm; actor: Actor; jobId?: number | null; at?: string }
): Promise<
	{ ok: true; id: number; figures: CheckFigures; offer: TaskOffer | null } | CoolingRefusal
> {
	const { form, actor } = input;
	const at = input.at ?? nowIso();
	if (!canWorkToolroom(actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not record cooling checks.' };
	}
	const circuit = await findCircuit(db, input.dieId, form.circuitId);
	if (!circuit) {
		return { ok: false, status: 404, field: 'circuitId', message: 'Choose a circuit of this die.' };
	}
	const read = readCheck(circuit, form);
	if (!read.ok) return read;
	const values = read.values;
	if (input.jobId != null && !(await isOpenJobOfDie(db, input.jobId, input.dieId))) {
		return {
			ok: false,
			status: 400,
			message: 'That job is not an open job of this die; the check was not saved.'
		};
	}
	const figures = evaluateCheck(circuit, values);
	const id = await writeTransaction(db, async (trx) => {
		const row = await trx
			.insertInto('cooling_checks')
			.values({
				circuit_id: circuit.id,
				die_id: input.dieId,
				checked_at: at,
				checked_by: actor.userId,
				supply_pressure_bar: form.supplyPressureBar,
				leak_test: form.leakTest,
				notes: form.notes,
				job_id: input.jobId ?? null,
				flushed: form.flushed ? 1 : 0,
				...values
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				action: 'cooling.check',
				dieId: input.dieId,
				detail: {
					check: row.id,
					circuit: circuit.label,
					flowLpm: form.measuredFlowLpm,
					pctOfNominal: Math.round(figures.pctOfNominal),
					weak: figures.weak,
					leak: form.leakTest,
					flushed: form.flushed,
					...(values.unusual_reason ? { unusualReason: values.unusual_reason } : {})
				}
			},
			at
		);
		return row.id;
	});
	let offer: TaskOffer | null = null;
	if (form.flushed) {
		const die = await db
			.selectFrom('dies')
			.select('total_shots')
			.where('id', '=', input.dieId)
			.executeTakeFirstOrThrow();
		offer = await findTaskToComplete(db, {
			dieId: input.dieId,
			record: 'cooling_flush',
			at,
			shots: die.total_shots
		});
	}
	return { ok: true, id, figures, offer };
}

export type VoidResult = { ok: true; id: number } | CoolingRefusal;

function leadOnly(actor: Actor, what: string): CoolingRefusal | null {
	return canLeadToolroom(actor.role)
		? null
		: { ok: false, status: 403, message: `Only the toolroom lead may ${what}.` };
}

function checkReason(reason: string): CoolingRefusal | null {
	return reason.trim().length >= MIN_REASON
		? null
		: {
				ok: false,
				status: 400,
				field: 'reason',
				message: `Give the reason (at least ${MIN_REASON} characters).`
			};
}

async function findLiveCheck(db: DB, dieId: number, checkId: number) {
	return db
		.selectFrom('cooling_checks')
		.selectAll()
		.where('id', '=', checkId)
		.where('die_id', '=', dieId)
		.executeTakeFirst();
}

/**
 * Voids a cooling check (toolroom lead, with a reason): it stays in the list, struck through, and
 * in the audit log, and no longer counts as the circuit's latest check, in weak-circuit flags or
 * in the heat balance.
 */
export async function voidCoolingCheck(
	db: DB,
	input: { dieId: number; checkId: number; reason: string; actor: Actor; at?: string }
): Promise<VoidResult> {
	const refused = leadOnly(input.actor, 'void a cooling check') ?? checkReason(input.reason);
	if (refused) return refused;
	const at = input.at ?? nowIso();
	const check = await findLiveCheck(db, input.dieId, input.checkId);
	if (!check) return { ok: false, status: 404, message: 'There is no such check on this die.' };
	if (check.voided_at) {
		return { ok: false, status: 409, message: 'This check is already void.' };
	}
	await writeTransaction(db, async (trx) => {
		await trx
			.updateTable('cooling_checks')
			.set({ voided_at: at, voided_by: input.actor.userId, void_reason: input.reason.trim() })
			.where('id', '=', check.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'cooling.void',
				dieId: input.dieId,
				detail: { check: check.id, checkedAt: check.checked_at, reason: input.reason.trim() }
			},
			at
		);
	});
	return { ok: true, id: check.id };
}

/**
 * Corrects a cooling check (toolroom lead, with a reason): the corrected reading is recorded at
 * the original time and by the original toolmaker, pointing at the check it replaces, and the old
 * one is voided — in one transaction. The corrected reading is judged like a new one.
 */
export async function correctCoolingCheck(
	db: DB,
	input: {
		dieId: number;
		checkId: number;
		form: Omit<CoolingCheckForm, 'circuitId'>;
		reason: string;
		actor: Actor;
		at?: string;
	}
): Promise<{ ok: true; id: number; figures: CheckFigures } | CoolingRefusal> {
	const refused = leadOnly(input.actor, 'correct a cooling check') ?? checkReason(input.reason);
	if (refused) return refused;
	const at = input.at ?? nowIso();
	const old = await findLiveCheck(db, input.dieId, input.checkId);
	if (!old) return { ok: false, status: 404, message: 'There is no such check on this die.' };
	if (old.voided_at) return { ok: false, status: 409, message: 'This check is already void.' };
	const circuit = await findCircuit(db, input.dieId, old.circuit_id);
	if (!circuit)
		return { ok: false, status: 404, message: 'The check’s circuit is no longer in use.' };
	// Oil properties not typed again are those of the check being corrected.
	const read = readCheck(circuit, {
		...input.form,
		circuitId: circuit.id,
		oilDensityKgM3: input.form.oilDensityKgM3 ?? old.oil_density_kg_m3,
		oilViscosityMpaS: input.form.oilViscosityMpaS ?? old.oil_viscosity_mpa_s,
		oilSpecificHeatJKgK: input.form.oilSpecificHeatJKgK ?? old.oil_specific_heat_j_kgk
	});
	if (!read.ok) return read;
	const figures = evaluateCheck(circuit, read.values);
	const reason = input.reason.trim();
	const id = await writeTransaction(db, async (trx) => {
		const row = await trx
			.insertInto('cooling_checks')
			.values({
				circuit_id: circuit.id,
				die_id: input.dieId,
				checked_at: old.checked_at,
				checked_by: old.checked_by,
				supply_pressure_bar: input.form.supplyPressureBar,
				leak_test: input.form.leakTest,
				notes: input.form.notes,
				corrects_id: old.id,
				...read.values
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await trx
			.updateTable('cooling_checks')
			.set({
				voided_at: at,
				voided_by: input.actor.userId,
				void_reason: `Corrected: ${reason}`
			})
			.where('id', '=', old.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'cooling.correct',
				dieId: input.dieId,
				detail: {
					check: old.id,
					correctedBy: row.id,
					reason,
					was: { flowLpm: old.measured_flow_lpm, inletC: old.inlet_c, outletC: old.outlet_c },
					now: {
						flowLpm: read.values.measured_flow_lpm,
						inletC: read.values.inlet_c,
						outletC: read.values.outlet_c
					}
				}
			},
			at
		);
		return row.id;
	});
	return { ok: true, id, figures };
}

const CHECK_COLUMNS = [
	'k.id',
	'k.circuit_id',
	'k.checked_at',
	'k.measured_flow_lpm',
	'k.inlet_c',
	'k.outlet_c',
	'k.supply_pressure_bar',
	'k.leak_test',
	'k.notes',
	'k.oil_density_kg_m3',
	'k.oil_viscosity_mpa_s',
	'k.oil_specific_heat_j_kgk',
	'k.voided_at',
	'k.void_reason',
	'k.corrects_id',
	'k.unusual_reason',
	'u.name as checkedBy'
] as const;

/** The die's circuits with each one's latest check and figures, plus recent checks. */
export async function listCircuits(db: DB, dieId: number) {
	const [circuits, checks] = await Promise.all([
		db
			.selectFrom('cooling_circuits')
			.selectAll()
			.where('die_id', '=', dieId)
			.where('active', '=', 1)
			.orderBy('half')
			.orderBy('label')
			.execute(),
		db
			.selectFrom('cooling_checks as k')
			.leftJoin('users as u', 'u.id', 'k.checked_by')
			.select(CHECK_COLUMNS)
			.where('k.die_id', '=', dieId)
			.orderBy('k.checked_at', 'desc')
			.orderBy('k.id', 'desc')
			.limit(200)
			.execute()
	]);
	const byId = new Map(circuits.map((c) => [c.id, c]));
	const withFigures = checks
		.filter((k) => byId.has(k.circuit_id))
		.map((k) => ({
			...k,
			circuitLabel: byId.get(k.circuit_id)!.label,
			figures: evaluateCheck(byId.get(k.circuit_id)!, k)
		}));
	return {
		circuits: circuits.map((c) => ({
			...c,
			// A voided check never counts: the latest is the latest live one.
			latest: withFigures.find((k) => k.circuit_id === c.id && k.voided_at === null) ?? null
		})),
		recentChecks: withFigures.slice(0, 20)
	};
}
export type CircuitView = Awaited<ReturnType<typeof listCircuits>>['circuits'][number];

/** Oil properties of the circuit's last check, so the next check starts from them. */
export function lastOilProperties(circuit: CircuitView) {
	const k = circuit.latest;
	return {
		oilDensityKgM3: k?.oil_density_kg_m3 ?? undefined,
		oilViscosityMpaS: k?.oil_viscosity_mpa_s ?? undefined,
		oilSpecificHeatJKgK: k?.oil_specific_heat_j_kgk ?? undefined
	};
}

export interface HeatBalanceView {
	alloy: {
		code: string;
		name: string;
		specificHeat: number | null;
		/** Liquid specific heat; null when not recorded (the solid's value is used). */
		specificHeatLiquid: number | null;
		latentHeat: number | null;
		solidusC: number | null;
		liquidusC: number | null;
		pourC: number | null;
	};
	/** Alloy properties the balance needs but the alloy record lacks (latent heat can be typed). */
	missing: string[];
	needsLatentHeat: boolean;
	coolingKw: number;
	circuitsCounted: number;
	circuitsWithoutCheck: number;
	heatPerShotKj: number | null;
	result: HeatBalance | null;
	error: { field: string; message: string } | null;
}

/**
 * Heat the metal brings (alloy properties, shot mass, shots per hour, eject temperature) against
 * the sum of the latest measured heat removal of the die's circuits. Without inputs only the
 * cooling side is worked out.
 */
export async function getHeatBalance(
	db: DB,
	die: { id: number; alloy_id: number },
	circuits: CircuitView[],
	query: HeatBalanceQuery | null
): Promise<HeatBalanceView> {
	const alloy = await db
		.selectFrom('alloys')
		.select([
			'code',
			'name',
			'specific_heat_j_kgk',
			'specific_heat_liquid_j_kgk',
			'latent_heat_j_kg',
			'solidus_c',
			'liquidus_c',
			'pour_temp_c'
		])
		.where('id', '=', die.alloy_id)
		.executeTakeFirstOrThrow();
	const missing = (
		[
			['specific heat', alloy.specific_heat_j_kgk],
			['solidus', alloy.solidus_c],
			['liquidus', alloy.liquidus_c],
			['pouring temperature', alloy.pour_temp_c]
		] as const
	)
		.filter(([, v]) => v === null)
		.map(([name]) => name);
	const latest = circuits.map((c) => c.latest?.figures.heatKw ?? null);
	// A check with the outlet colder than the inlet removes no heat; it does not subtract any.
	const coolingKw = latest.reduce<number>((sum, kw) => sum + Math.max(0, kw ?? 0), 0);
	const view: HeatBalanceView = {
		alloy: {
			code: alloy.code,
			name: alloy.name,
			specificHeat: alloy.specific_heat_j_kgk,
			specificHeatLiquid: alloy.specific_heat_liquid_j_kgk,
			latentHeat: alloy.latent_heat_j_kg,
			solidusC: alloy.solidus_c,
			liquidusC: alloy.liquidus_c,
			pourC: alloy.pour_temp_c
		},
		missing,
		needsLatentHeat: alloy.latent_heat_j_kg === null,
		coolingKw,
		circuitsCounted: latest.filter((kw) => kw !== null).length,
		circuitsWithoutCheck: latest.filter((kw) => kw === null).length,
		heatPerShotKj: null,
		result: null,
		error: null
	};
	if (!query || missing.length > 0) return view;
	const latentHeat =
		alloy.latent_heat_j_kg ??
		(query.latentHeatKjKg !== undefined ? query.latentHeatKjKg * 1000 : null);
	if (latentHeat === null) {
		view.error = {
			field: 'latentHeatKjKg',
			message: 'The alloy record has no latent heat: enter it from the alloy data sheet.'
		};
		return view;
	}
	try {
		view.heatPerShotKj = heatPerShotKj({
			shotMassKg: query.shotMassKg,
			pourC: alloy.pour_temp_c!,
			liquidusC: alloy.liquidus_c!,
			solidusC: alloy.solidus_c!,
			ejectC: query.ejectC,
			cpLiquid: alloy.specific_heat_liquid_j_kgk ?? alloy.specific_heat_j_kgk!,
			cpSolid: alloy.specific_heat_j_kgk!,
			latentHeatJPerKg: latentHeat
		});
		view.result = dieHeatBalance({
			heatPerShotKj: view.heatPerShotKj,
			shotsPerHour: query.shotsPerHour,
			coolingKw
		});
	} catch (error) {
		if (!(error instanceof RangeError)) throw error;
		const field = /eject/i.test(error.message) ? 'ejectC' : 'shotMassKg';
		view.error = { field, message: error.message };
	}
	return view;
}

/** Active circuits whose latest check is below the weak-flow threshold, for the toolroom home. */
export async function listWeakCircuits(db: DB) {
	const rows = await db
		.selectFrom('cooling_checks as k')
		.innerJoin('cooling_circuits as c', 'c.id', 'k.circuit_id')
		.innerJoin('dies', 'dies.id', 'c.die_id')
		.select([
			'c.id as circuitId',
			'c.label',
			'c.half',
			'c.coolant',
			'c.nominal_flow_lpm as nominalLpm',
			'k.measured_flow_lpm as measuredLpm',
			'k.checked_at as checkedAt',
			'k.leak_test as leakTest',
			'dies.number as dieNumber',
			'dies.part_name as partName'
		])
		.where('c.active', '=', 1)
		.where('dies.status', '!=', 'retired')
		.where('k.voided_at', 'is', null)
		// The latest live check of each circuit only.
		.where(({ not, exists, selectFrom }) =>
			not(
				exists(
					selectFrom('cooling_checks as later')
						.select('later.id')
						.whereRef('later.circuit_id', '=', 'k.circuit_id')
						.where('later.voided_at', 'is', null)
						.where((eb) =>
							eb.or([
								eb('later.checked_at', '>', eb.ref('k.checked_at')),
								eb.and([
									eb('later.checked_at', '=', eb.ref('k.checked_at')),
									eb('later.id', '>', eb.ref('k.id'))
								])
							])
						)
				)
			)
		)
		.execute();
	return rows
		.map((r) => ({ ...r, pctOfNominal: (100 * r.measuredLpm) / r.nominalLpm }))
		.filter((r) => r.pctOfNominal < WEAK_FLOW_THRESHOLD_PCT || r.leakTest === 'fail')
		.sort((a, b) => a.pctOfNominal - b.pctOfNominal);
}
