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

/** Adds a cooling circuit to a die (toolroom lead or admin). */
export async function addCircuit(
	db: DB,
	input: { dieId: number; form: CircuitForm; actor: Actor; at?: string }
): Promise<{ ok: true; id: number } | CoolingRefusal> {
	const { form, actor } = input;
	const at = input.at ?? nowIso();
	if (!canLeadToolroom(actor.role)) {
		return {
			ok: false,
			status: 403,
			message: 'Only the toolroom lead may define cooling circuits.'
		};
	}
	return db.transaction().execute(async (trx) => {
		const clash = await trx
			.selectFrom('cooling_circuits')
			.select('id')
			.where('die_id', '=', input.dieId)
			.where('label', '=', form.label)
			.executeTakeFirst();
		if (clash) {
			return {
				ok: false,
				status: 409,
				field: 'label',
				message: `This die already has a circuit labelled “${form.label}”.`
			} as const;
		}
		const row = await trx
			.insertInto('cooling_circuits')
			.values({
				die_id: input.dieId,
				half: form.half,
				label: form.label,
				coolant: form.coolant,
				channel_diameter_mm: form.channelDiameterMm,
				nominal_flow_lpm: form.nominalFlowLpm,
				created_by: actor.userId,
				created_at: at
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				action: 'cooling.circuit',
				dieId: input.dieId,
				detail: { label: form.label, coolant: form.coolant, nominalLpm: form.nominalFlowLpm }
			},
			at
		);
		return { ok: true, id: row.id } as const;
	});
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
	const circuit = await db
		.selectFrom('cooling_circuits')
		.select(['id', 'label', 'coolant', 'channel_diameter_mm', 'nominal_flow_lpm'])
		.where('id', '=', form.circuitId)
		.where('die_id', '=', input.dieId)
		.where('active', '=', 1)
		.executeTakeFirst();
	if (!circuit) {
		return { ok: false, status: 404, field: 'circuitId', message: 'Choose a circuit of this die.' };
	}
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
	const values = {
		measured_flow_lpm: form.measuredFlowLpm,
		inlet_c: form.inletC,
		outlet_c: form.outletC,
		oil_density_kg_m3: isOil ? form.oilDensityKgM3 : null,
		oil_viscosity_mpa_s: isOil ? form.oilViscosityMpaS : null,
		oil_specific_heat_j_kgk: isOil ? form.oilSpecificHeatJKgK : null
	};
	if (input.jobId != null && !(await isOpenJobOfDie(db, input.jobId, input.dieId))) {
		return {
			ok: false,
			status: 400,
			message: 'That job is not an open job of this die; the check was not saved.'
		};
	}
	const figures = evaluateCheck(circuit, values);
	const id = await db.transaction().execute(async (trx) => {
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
					circuit: circuit.label,
					flowLpm: form.measuredFlowLpm,
					pctOfNominal: Math.round(figures.pctOfNominal),
					weak: figures.weak,
					leak: form.leakTest,
					flushed: form.flushed
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
			latest: withFigures.find((k) => k.circuit_id === c.id) ?? null
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
			cpLiquid: alloy.specific_heat_j_kgk!,
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
		// The latest check of each circuit only.
		.where(({ not, exists, selectFrom }) =>
			not(
				exists(
					selectFrom('cooling_checks as later')
						.select('later.id')
						.whereRef('later.circuit_id', '=', 'k.circuit_id')
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
