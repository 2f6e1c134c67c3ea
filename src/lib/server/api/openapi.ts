import { DEFAULT_SCRAP_PCT } from '../../schemas/schedule';
import { CUSTOMER_FIELDS } from '../owner/customer-fields';
import { MAX_BATCH } from '../shots/ledger';

/**
 * The OpenAPI 3.1 description of `/api/v1`, served at `/api/v1/openapi.json`. Written by hand
 * beside the routes; `tests/integration/api-openapi.test.ts` checks the document against the
 * OpenAPI 3.1 schema, checks that it names every route under `src/routes/api/v1`, and validates
 * the routes' real answers (successes and errors) against it. Fields a tooling owner may not read
 * (owner/customer-fields.ts) are optional here, so one description fits both audiences.
 *
 * Vocabulary: the press is `press` on input and output. `machine` is its old name on shot
 * entries, still accepted on input for one release (deprecated), never answered.
 */

const ref = (name: string) => ({ $ref: `#/components/schemas/${name}` });
const nullable = (type: string) => ({ type: [type, 'null'] });
const json = (schema: object, description: string) => ({
	description,
	content: { 'application/json': { schema } }
});
const error = (description: string) => json(ref('Error'), description);

/** The answers every authenticated route may give before it reads its input. */
const AUTH_ERRORS = {
	'401': error('No credentials, an unknown, revoked or expired token, or a malformed header.'),
	'403': error('The token lacks the scope, or the role may not use it.')
};

const dieNumberParam = {
	name: 'number',
	in: 'path',
	required: true,
	description: 'The die number, e.g. D-0101.',
	schema: { type: 'string', maxLength: 20 }
};

const query = (name: string, description: string, schema: object = { type: 'string' }) => ({
	name,
	in: 'query',
	required: false,
	description,
	schema
});

const serviceTask = {
	type: ['object', 'null'],
	required: ['kind', 'state', 'shotsRemaining', 'daysRemaining'],
	properties: {
		kind: { type: 'string', examples: ['stress_relief'] },
		state: { enum: ['on_track', 'coming_up', 'due', 'overdue'] },
		shotsRemaining: nullable('integer'),
		daysRemaining: nullable('number')
	},
	additionalProperties: false
};

const dieProperties = {
	number: { type: 'string', examples: ['D-0101'] },
	part: { type: 'string', description: 'The part the die casts.' },
	partNumber: {
		type: ['string', 'null'],
		description: "The customer's part number; null when the plant has not recorded one."
	},
	customer: {
		type: 'object',
		required: ['code', 'name'],
		properties: { code: { type: 'string' }, name: { type: 'string' } },
		additionalProperties: false
	},
	alloy: { type: 'string', examples: ['A380'] },
	family: { enum: ['zinc', 'magnesium', 'aluminium', 'copper'] },
	status: ref('DieStatus'),
	totalShots: { type: 'integer', minimum: 0 },
	expectedLifeShots: { type: 'integer', minimum: 1 },
	lifeUsedPct: {
		type: 'number',
		minimum: 0,
		description: 'Life used of the most-worn active half, percent; may pass 100.'
	},
	nextService: { ...serviceTask, description: 'The worst active service task; null when none.' }
};
const DIE_REQUIRED = Object.keys(dieProperties);

const tableOf = (description: string) => ({
	type: 'object',
	description,
	required: ['columns', 'rows'],
	properties: {
		columns: { type: 'array', items: { type: 'string' } },
		rows: {
			type: 'array',
			items: { type: 'array', items: { type: ['string', 'number', 'boolean', 'null'] } }
		}
	},
	additionalProperties: false
});

/**
 * A board table whose columns are named once; `columns` lists the names in row order. A tooling
 * owner's table may leave columns out (owner/customer-fields.ts), so each row follows `columns`.
 */
const boardTable = (description: string, columns: readonly string[]) => {
	const table = tableOf(description);
	return {
		...table,
		properties: {
			...table.properties,
			columns: { type: 'array', items: { enum: [...columns] }, uniqueItems: true }
		}
	};
};

/** What the booking checks made of a booking that was saved: blocks are never saved. */
const savedVerdict = {
	enum: ['fits', 'warning'],
	description: 'fits: nothing blocks or warns; warning: saved with the warnings confirmed.'
};

/** Plant time without an offset, or ISO-8601 with Z or an offset. */
const DATE_TIME_INPUT = 'Date-time; plant time without an offset.';

const booking = {
	type: 'object',
	// What a tooling owner reads is always there; the plant's own fields come on top.
	required: [...CUSTOMER_FIELDS.booking],
	properties: {
		id: { type: 'integer' },
		die: { type: 'string' },
		part: { type: 'string' },
		customer: { type: 'string', description: 'The owner’s customer code.' },
		press: { type: 'string' },
		startsAt: { type: 'string', format: 'date-time' },
		endsAt: { type: 'string', format: 'date-time' },
		parts: { type: 'integer', minimum: 1 },
		shotsPlanned: { type: 'integer', minimum: 0 },
		status: { enum: ['planned', 'running', 'ended', 'cancelled'] },
		cancelledAt: { type: ['string', 'null'], format: 'date-time' },
		orderRef: { type: 'string', description: 'Plant only.' },
		scrapPct: { type: 'number', description: 'Plant only.' },
		shotsPerHour: { type: ['number', 'null'], description: 'Plant only.' },
		notes: { type: ['string', 'null'], description: 'Plant only.' },
		endReason: {
			type: ['string', 'null'],
			description:
				'Plant only. Why the end differs from the worked-out one (die change + preheat + press hours); null when the end was worked out.'
		}
	},
	additionalProperties: false
};

const reason = {
	type: 'object',
	required: ['code', 'level', 'sentence', 'number'],
	properties: {
		code: {
			enum: [
				'die_retired',
				'die_held',
				'die_in_toolroom',
				'die_double_booked',
				'press_double_booked',
				'press_down',
				'clamp_force',
				'chamber_process',
				'chamber_alloy',
				'service_due',
				'end_of_life',
				'rate_unusual',
				'too_short',
				'service_window'
			]
		},
		level: { enum: ['block', 'warn'] },
		sentence: { type: 'string' },
		number: nullable('number')
	},
	additionalProperties: false
};

const shotEntry = {
	type: 'object',
	description:
		'One counter interval: shots, or counterStart and counterEnd (then shots, if sent, must match).',
	required: ['die'],
	properties: {
		die: { type: 'string', maxLength: 20, examples: ['D-0101'] },
		shots: { type: 'integer', minimum: 1 },
		counterStart: { type: ['integer', 'null'], minimum: 0 },
		counterEnd: { type: ['integer', 'null'], minimum: 0 },
		countedAt: {
			type: 'string',
			description: 'ISO-8601 date-time; without an offset it is read in plant time. Default: now.'
		},
		press: { type: ['string', 'null'], maxLength: 40, description: 'The press name.' },
		machine: {
			type: ['string', 'null'],
			maxLength: 40,
			deprecated: true,
			description:
				'Old name of press, accepted on input for one more release. Send press instead; when both are sent they must name the same press.'
		},
		key: {
			type: ['string', 'null'],
			maxLength: 200,
			description: 'Idempotency key: an entry sent again with the same key is not counted twice.'
		},
		resetReason: {
			type: ['string', 'null'],
			maxLength: 500,
			description: 'Why the counter went back (reset or rollover).'
		}
	},
	additionalProperties: false
};

export const OPENAPI_DOCUMENT = {
	openapi: '3.1.0',
	info: {
		title: 'Castellan API',
		version: '1',
		description:
			'Die register, shot ledger, order checks and press bookings of one die-casting plant. Authenticate with `Authorization: Bearer <token>` (tokens are made by an admin on /admin/tokens, each with scopes and optionally bound to one tooling owner) or with a signed-in session. A token bound to a tooling owner sees that owner’s dies only and fewer fields; another owner’s die answers 404, like a missing one. Errors are `{ "error": sentence, "issues"?: [{ "index"?, "field", "message" }] }`.'
	},
	servers: [{ url: '/api/v1' }],
	security: [{ bearer: [] }, { session: [] }],
	paths: {
		'/openapi.json': {
			get: {
				operationId: 'getOpenApi',
				summary: 'This description',
				description: 'Any valid token or session may read it, whatever its scopes.',
				responses: {
					'200': json(
						{
							type: 'object',
							required: ['openapi', 'info', 'paths'],
							properties: {
								openapi: { type: 'string' },
								info: { type: 'object' },
								paths: { type: 'object' }
							}
						},
						'The document.'
					),
					'401': AUTH_ERRORS['401']
				}
			}
		},
		'/dies': {
			get: {
				operationId: 'listDies',
				summary: 'The die register, one page at a time (scope dies:read)',
				parameters: [
					query('q', 'Search die number, part, part number (dashes optional) or owner name.'),
					query('status', 'One state, or active for any but retired.', {
						enum: ['ready', 'running', 'in_toolroom', 'held', 'retired', 'active', '']
					}),
					query('owner', 'Customer code.'),
					query('family', 'Alloy family.', {
						enum: ['zinc', 'magnesium', 'aluminium', 'copper', '']
					}),
					query('sort', 'Sort key; unknown keys sort by number.', {
						enum: ['number', 'part', 'partNumber', 'owner', 'alloy', 'status', 'shots', 'life']
					}),
					query('dir', 'Direction.', { enum: ['asc', 'desc'] }),
					query('page', 'Page, from 1.', { type: 'integer', minimum: 1 }),
					query('size', 'Dies per page, 10 to 200 (default 50).', {
						type: 'integer',
						minimum: 10,
						maximum: 200
					})
				],
				responses: {
					'200': json(
						{
							type: 'object',
							required: ['total', 'page', 'size', 'dies'],
							properties: {
								total: { type: 'integer', minimum: 0 },
								page: { type: 'integer', minimum: 1 },
								size: { type: 'integer', minimum: 10 },
								dies: { type: 'array', items: ref('Die') }
							},
							additionalProperties: false
						},
						'One page of dies.'
					),
					...AUTH_ERRORS
				}
			}
		},
		'/dies/{number}': {
			get: {
				operationId: 'getDie',
				summary: 'One die with its life and halves (scope dies:read)',
				parameters: [dieNumberParam],
				responses: {
					'200': json(ref('DieDetail'), 'The die.'),
					...AUTH_ERRORS,
					'404': error('No such die, or another owner’s.')
				}
			}
		},
		'/dies/{number}/order-check': {
			get: {
				operationId: 'checkOrder',
				summary: 'Can this die make N parts? The order-check page’s verdict (scope dies:read)',
				parameters: [
					dieNumberParam,
					{ ...query('parts', 'Good parts wanted.'), required: true },
					query('scrapPct', `Scrap allowance, percent, 0 to 90. Default ${DEFAULT_SCRAP_PCT}.`),
					query(
						'shotsPerHour',
						'Planned rate. Optional: without it the default rate of the run is used (the die’s or the press’s where one is set, else the middle of the alloy family’s usual range); rateIsDefault says so.'
					),
					query('press', 'Press name; without it the press checks are skipped.'),
					query('from', 'Start, ISO-8601 date-time (plant time without an offset). Default now.')
				],
				responses: {
					'200': json(ref('OrderCheck'), 'The verdict and the figures behind it.'),
					'400': error('A parameter is not usable, or there is no such press.'),
					...AUTH_ERRORS,
					'404': error('No such die, or another owner’s.')
				}
			}
		},
		'/board': {
			get: {
				operationId: 'getBoard',
				summary: 'The availability board in compact tables (scope dies:read)',
				parameters: [
					query('from', 'First day, YYYY-MM-DD (default: this week’s Monday).'),
					query('days', '14, 28 or 56 (default 28).', { type: 'integer' }),
					query('owner', 'Customer code.'),
					query('family', 'Alloy family.'),
					query('press', 'Press name: only dies this press can run.')
				],
				responses: { '200': json(ref('Board'), 'The board.'), ...AUTH_ERRORS }
			}
		},
		'/bookings': {
			get: {
				operationId: 'listBookings',
				summary: 'Bookings overlapping plant days from..to (scope dies:read)',
				parameters: [
					{ ...query('from', 'First plant day, YYYY-MM-DD.'), required: true },
					{
						...query('to', 'Last plant day, YYYY-MM-DD (at most 400 days after from).'),
						required: true
					},
					query('die', 'Die number.'),
					query('press', 'Press name.'),
					query('cancelled', '1 to include cancelled bookings.', { enum: ['0', '1'] })
				],
				responses: {
					'200': json(
						{
							type: 'object',
							required: ['from', 'to', 'bookings'],
							properties: {
								from: { type: 'string', format: 'date' },
								to: { type: 'string', format: 'date' },
								bookings: { type: 'array', items: ref('Booking') }
							},
							additionalProperties: false
						},
						'The bookings.'
					),
					'400': error('from or to missing or not dates, or the window too long.'),
					...AUTH_ERRORS
				}
			},
			post: {
				operationId: 'createBooking',
				summary: 'Book a die on a press, checked like the booking form (scope bookings:write)',
				description:
					'Without endsAt the end is worked out: die change + preheat of the press, then the press hours for the shots at the rate. An endsAt other than the worked-out end needs endReason.',
				requestBody: {
					required: true,
					content: { 'application/json': { schema: ref('BookingRequest') } }
				},
				responses: {
					'201': json(
						{
							type: 'object',
							required: ['booking', 'verdict', 'warnings'],
							properties: {
								booking: ref('Booking'),
								verdict: savedVerdict,
								warnings: {
									type: 'array',
									description: 'The warnings confirmed, as sentences.',
									items: { type: 'string' }
								}
							},
							additionalProperties: false
						},
						'Booked. The location header names the booking page.'
					),
					'400': error(
						'The booking is incomplete, names an unknown die or press, sets an end other than the worked-out one without endReason, or works out at more than 90 days.'
					),
					...AUTH_ERRORS,
					'409': error(
						'Only warnings stand: send the same booking with "confirm": true. issues lists them (field is the check code).'
					),
					'413': error('The body is too large.'),
					'415': error('The body is not application/json.'),
					'422': error(
						'A check blocks the booking; blocks cannot be overridden. issues lists them (field is the check code).'
					)
				}
			}
		},
		'/bookings/{id}': {
			patch: {
				operationId: 'updateBooking',
				summary:
					'Edit or move a booking that has not ended, checked like the booking form (scope bookings:write)',
				description:
					'Send only the fields to change; the others stay as booked (the die cannot change: cancel and book the other die). The end is worked out again (die change + preheat + press hours) when endsAt is null or empty, and when endsAt is left out, unless the booking’s end was set by hand and neither start nor press changes. An endsAt other than the worked-out end needs endReason (the booking’s own reason is kept when none is sent).',
				parameters: [
					{
						name: 'id',
						in: 'path',
						required: true,
						description: 'The booking id.',
						schema: { type: 'integer', minimum: 1 }
					}
				],
				requestBody: {
					required: true,
					content: { 'application/json': { schema: ref('BookingPatch') } }
				},
				responses: {
					'200': json(
						{
							type: 'object',
							required: ['booking', 'changed', 'verdict', 'warnings'],
							properties: {
								booking: ref('Booking'),
								changed: {
									type: 'array',
									description:
										'The fields that changed, by the names the booking’s history shows; empty when nothing did.',
									items: {
										enum: [
											'press',
											'start',
											'end',
											'parts',
											'scrap %',
											'shots/h',
											'order',
											'notes',
											'end reason'
										]
									},
									uniqueItems: true
								},
								verdict: savedVerdict,
								warnings: {
									type: 'array',
									description: 'The warnings confirmed, as sentences.',
									items: { type: 'string' }
								}
							},
							additionalProperties: false
						},
						'Saved (or nothing to change). The booking as it stands now.'
					),
					'400': error(
						'The body is not a JSON object or has an unknown or invalid field, names an unknown press, sets an end other than the worked-out one without a reason, or the run works out at more than 90 days.'
					),
					...AUTH_ERRORS,
					'404': error('No such booking, or one of another owner’s dies.'),
					'409': error(
						'Only warnings stand: send the same change with "confirm": true (issues lists them; field is the check code). Or the booking is cancelled or has ended, and stays as it was.'
					),
					'413': error('The body is too large.'),
					'415': error('The body is not application/json.'),
					'422': error(
						'A check blocks the changed booking; blocks cannot be overridden. issues lists them (field is the check code).'
					)
				}
			}
		},
		'/presses/{press}/mounted': {
			get: {
				operationId: 'getMountedDie',
				summary: 'Which die is on a press now (scope shots:write; plant callers only)',
				parameters: [
					{
						name: 'press',
						in: 'path',
						required: true,
						description: 'Press name (case does not matter).',
						schema: { type: 'string' }
					}
				],
				responses: {
					'200': json(
						{
							type: 'object',
							required: ['press', 'die', 'source', 'since'],
							properties: {
								press: { type: 'string' },
								die: nullable('string'),
								source: { enum: ['counts', 'booking', null] },
								since: { type: ['string', 'null'], format: 'date-time' }
							},
							additionalProperties: false
						},
						'The die counting on the press, else the booking under way, else nulls.'
					),
					...AUTH_ERRORS,
					'404': error('No press of that name.')
				}
			}
		},
		'/shots': {
			post: {
				operationId: 'recordShots',
				summary: `Count shots: one entry or an array of up to ${MAX_BATCH}, all or nothing (scope shots:write)`,
				requestBody: {
					required: true,
					content: {
						'application/json': {
							schema: {
								oneOf: [
									ref('ShotEntry'),
									{ type: 'array', minItems: 1, maxItems: MAX_BATCH, items: ref('ShotEntry') }
								]
							}
						}
					}
				},
				responses: {
					'201': json(
						{
							type: 'object',
							required: ['accepted', 'duplicates', 'dies', 'warnings'],
							properties: {
								accepted: { type: 'integer', minimum: 0 },
								duplicates: {
									type: 'integer',
									minimum: 0,
									description: 'Entries whose key was already counted; not counted again.'
								},
								dies: {
									type: 'array',
									items: {
										type: 'object',
										required: ['die', 'totalShots'],
										properties: { die: { type: 'string' }, totalShots: { type: 'integer' } },
										additionalProperties: false
									}
								},
								warnings: {
									type: 'array',
									description:
										'Plausibility warnings; those entries are counted and marked to review.',
									items: {
										type: 'object',
										required: ['index', 'message'],
										properties: { index: { type: 'integer' }, message: { type: 'string' } },
										additionalProperties: false
									}
								}
							},
							additionalProperties: false
						},
						'Counted.'
					),
					'400': error('Entries have problems (each listed with its index); nothing was counted.'),
					...AUTH_ERRORS,
					'404': error('The single entry names no die the caller may see.'),
					'409': json(
						{
							type: 'object',
							allOf: [ref('Error')],
							properties: {
								error: true,
								issues: true,
								original: {
									type: 'object',
									description: 'The entry already counted under this key.',
									required: ['die', 'shots', 'countedAt', 'counterStart', 'counterEnd'],
									properties: {
										die: nullable('string'),
										shots: { type: 'integer' },
										countedAt: { type: 'string' },
										counterStart: nullable('integer'),
										counterEnd: nullable('integer')
									},
									additionalProperties: false
								}
							},
							unevaluatedProperties: false
						},
						'The key was used for a different entry, or the counter readings are already in the ledger.'
					),
					'413': error('The body is too large.'),
					'415': error('The body is not application/json.')
				}
			}
		}
	},
	components: {
		securitySchemes: {
			bearer: { type: 'http', scheme: 'bearer', description: 'An API token (cst_…).' },
			session: { type: 'apiKey', in: 'cookie', name: 'auth_session' }
		},
		schemas: {
			Error: {
				type: 'object',
				required: ['error'],
				properties: {
					error: { type: 'string', minLength: 1 },
					issues: {
						type: 'array',
						items: {
							type: 'object',
							required: ['field', 'message'],
							properties: {
								index: { type: 'integer', minimum: 0 },
								field: { type: 'string' },
								message: { type: 'string' }
							},
							additionalProperties: false
						}
					}
				}
			},
			DieStatus: { enum: ['ready', 'running', 'in_toolroom', 'held', 'retired'] },
			Die: {
				type: 'object',
				description: 'A tooling owner sees the same fields.',
				required: DIE_REQUIRED,
				properties: dieProperties,
				additionalProperties: false
			},
			DieDetail: {
				type: 'object',
				required: [
					...DIE_REQUIRED,
					'shotsPerDay',
					'projectedEndOfLife',
					'shotsRemaining',
					'lifeSide',
					'halves'
				],
				properties: {
					...dieProperties,
					shotsRemaining: { type: 'integer', minimum: 0 },
					shotsPerDay: { type: 'number', minimum: 0, description: 'Trailing 28-day rate.' },
					projectedEndOfLife: { type: ['string', 'null'], format: 'date' },
					lifeSide: { enum: ['cover', 'ejector', null] },
					halves: {
						type: 'array',
						items: {
							type: 'object',
							required: ['side', 'serial', 'installedAt', 'removedAt', 'shots', 'lifeUsedPct'],
							properties: {
								side: { enum: ['cover', 'ejector'] },
								serial: nullable('string'),
								installedAt: { type: 'string' },
								removedAt: nullable('string'),
								shots: { type: 'integer', minimum: 0 },
								lifeUsedPct: { type: 'number', minimum: 0 }
							},
							additionalProperties: false
						}
					},
					metalPressureBar: { type: 'number', description: 'Plant only.' },
					metalPressureIsDefault: { type: 'boolean', description: 'Plant only.' },
					toReview: {
						type: 'integer',
						minimum: 0,
						description: 'Plant only: ledger entries to review.'
					}
				},
				additionalProperties: false
			},
			OrderCheck: {
				type: 'object',
				required: [
					'die',
					'status',
					'verdict',
					'reasons',
					'press',
					'from',
					'until',
					'cavities',
					'totalShots',
					'shotsNeeded',
					'shotsPerHour',
					'rateIsDefault',
					'pressHours',
					'shotsToEndOfLife',
					'shotsToNextService',
					'nextServiceKind'
				],
				properties: {
					die: { type: 'string' },
					status: ref('DieStatus'),
					verdict: { enum: ['fits', 'warning', 'blocked'] },
					reasons: { type: 'array', items: reason, description: 'Blocks first, then warnings.' },
					press: nullable('string'),
					from: { type: 'string', format: 'date-time' },
					until: { type: 'string', format: 'date-time' },
					cavities: { type: 'integer', minimum: 1 },
					totalShots: { type: 'integer', minimum: 0 },
					shotsNeeded: { type: 'integer', minimum: 0 },
					shotsPerHour: { type: 'number', exclusiveMinimum: 0 },
					rateIsDefault: {
						type: 'boolean',
						description: 'True when no shotsPerHour was sent and the default rate was used.'
					},
					pressHours: { type: 'number', minimum: 0 },
					shotsToEndOfLife: { type: 'integer' },
					shotsToNextService: nullable('integer'),
					nextServiceKind: nullable('string'),
					clamp: {
						type: 'object',
						description: 'Plant only.',
						required: ['requiredKn', 'metalPressureBar', 'pressureIsDefault', 'availableKn'],
						properties: {
							requiredKn: { type: 'number' },
							metalPressureBar: { type: 'number' },
							pressureIsDefault: { type: 'boolean' },
							availableKn: nullable('number')
						},
						additionalProperties: false
					}
				},
				additionalProperties: false
			},
			Booking: booking,
			BookingRequest: {
				type: 'object',
				required: ['die', 'press', 'startsAt', 'orderRef', 'parts'],
				properties: {
					die: { type: 'string', maxLength: 20 },
					press: { type: 'string', maxLength: 20 },
					startsAt: { type: 'string', description: DATE_TIME_INPUT },
					endsAt: {
						type: 'string',
						description: `${DATE_TIME_INPUT} Left out or empty: worked out (die change + preheat + press hours).`
					},
					endReason: {
						type: 'string',
						maxLength: 300,
						description:
							'Why the booking ends other than at the worked-out end; required then (400 without it), not stored otherwise.'
					},
					orderRef: { type: 'string', maxLength: 40 },
					parts: { type: ['integer', 'string'], description: 'Good parts wanted.' },
					scrapPct: {
						type: ['number', 'string'],
						description: `Scrap allowance, percent. Default ${DEFAULT_SCRAP_PCT}.`
					},
					shotsPerHour: { type: ['number', 'string', 'null'], description: 'Planned rate.' },
					notes: { type: 'string', maxLength: 1000 },
					confirm: { type: 'boolean', description: 'Book despite warnings. Default false.' }
				}
			},
			BookingPatch: {
				type: 'object',
				description:
					'The fields to change; each left out stays as booked. Unknown fields are refused.',
				properties: {
					press: { type: 'string', maxLength: 20 },
					startsAt: { type: 'string', description: DATE_TIME_INPUT },
					endsAt: {
						type: ['string', 'null'],
						description: `${DATE_TIME_INPUT} null or empty: worked out again.`
					},
					endReason: {
						type: 'string',
						maxLength: 300,
						description: 'Why the booking ends other than at the worked-out end.'
					},
					orderRef: { type: 'string', maxLength: 40 },
					parts: { type: ['integer', 'string'], description: 'Good parts wanted.' },
					scrapPct: {
						type: ['number', 'string', 'null'],
						description: 'Scrap allowance, percent; null keeps the booked one.'
					},
					shotsPerHour: {
						type: ['number', 'string', 'null'],
						description: 'Planned rate; null goes back to the default rate of the run.'
					},
					notes: {
						type: 'string',
						maxLength: 1000,
						description: 'Replaces the notes; empty clears them.'
					},
					confirm: { type: 'boolean', description: 'Save despite warnings. Default false.' }
				},
				additionalProperties: false
			},
			Board: {
				type: 'object',
				required: [
					'from',
					'to',
					'days',
					'today',
					'generatedAt',
					'press',
					'dies',
					'bookings',
					'jobs',
					'service',
					'live',
					'windows'
				],
				properties: {
					from: { type: 'string', format: 'date' },
					to: { type: 'string', format: 'date', description: 'The day after the last day shown.' },
					days: { type: 'integer' },
					today: { type: 'string', format: 'date' },
					generatedAt: { type: 'string', format: 'date-time' },
					press: {
						type: ['object', 'null'],
						required: ['name', 'chamber', 'clampKn'],
						properties: {
							name: { type: 'string' },
							chamber: { enum: ['hot', 'cold'] },
							clampKn: { type: 'number' }
						},
						additionalProperties: false
					},
					dies: boardTable(
						'One row per die; other tables point at a die by its row index (column die). lifeUsedPct: of the most-worn active half.',
						['number', 'part', 'owner', 'family', 'status', 'lifeUsedPct']
					),
					bookings: boardTable(
						'Bookings in the window, not cancelled. start and end are date-times; phase is planned, running or ended; verdict (fits, warning or blocked) is the verdict on the run as it stands now, null once it has ended; why is its first reason as a sentence, null when there is none. A tooling owner gets fewer columns, never order, verdict or why.',
						['id', 'die', 'press', 'start', 'end', 'order', 'parts', 'phase', 'verdict', 'why']
					),
					jobs: boardTable('Open toolroom jobs (for a tooling owner: the shared ones).', [
						'die',
						'number',
						'kind',
						'status',
						'openedAt'
					]),
					service: boardTable('Service tasks falling due in the window (day: YYYY-MM-DD).', [
						'die',
						'day',
						'kind',
						'state'
					]),
					live: boardTable('Dies counting on a press now.', ['die', 'press', 'lastCountedAt']),
					windows: boardTable(
						'Service windows (toolroom time reserved on a die) in the window; no rows for a tooling owner.',
						['die', 'id', 'start', 'end', 'kind', 'note', 'job']
					)
				},
				additionalProperties: false
			},
			ShotEntry: shotEntry
		}
	}
} as const;
