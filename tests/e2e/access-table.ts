// The declared access matrix: for every page, form action and API route, what each caller gets.
// tests/e2e/access-matrix.spec.ts discovers the routes from src/routes and fails on any route
// missing here and on any cell that differs; scripts/access-matrix-doc.ts prints it for
// DEVELOPERS.md.
//
// Outcomes: ok = allowed (a page renders; an action or API call gets past the role check, usually
// to a 400 for the empty input the test sends), home = redirected to the caller's home page,
// login = sent to sign in, deny = 403, none = 404, unauth = 401.

export const PRINCIPALS = [
	'anon',
	'admin',
	'toolroom_lead',
	'toolmaker',
	'scheduler',
	'customer',
	'otherCustomer'
] as const;
export type Principal = (typeof PRINCIPALS)[number];
export type Outcome = 'ok' | 'home' | 'login' | 'deny' | 'none' | 'unauth';
export type Cells = Record<Principal, Outcome>;

type Role = Exclude<Principal, 'anon' | 'otherCustomer'>;
const PLANT: Role[] = ['admin', 'toolroom_lead', 'toolmaker', 'scheduler'];
const LEADS: Role[] = ['admin', 'toolroom_lead'];
const WORKERS: Role[] = ['admin', 'toolroom_lead', 'toolmaker'];
const RECORDERS: Role[] = ['admin', 'toolroom_lead', 'scheduler'];
const PLANNERS: Role[] = ['admin', 'scheduler'];

/** Signed-in roles in the list may; other signed-in roles get 403; signed-out callers sign in. */
function roles(...allowed: Role[]): Cells {
	const cells = { anon: 'login' } as Cells;
	for (const p of PRINCIPALS.slice(1)) {
		const role = p === 'otherCustomer' ? 'customer' : p;
		cells[p] = allowed.includes(role as Role) ? 'ok' : 'deny';
	}
	return cells;
}
/** A customer's own tooling: the second customer gets 404, as for a die that does not exist. */
function ownTooling(): Cells {
	return { ...roles('customer'), otherCustomer: 'none' };
}
const everyone = (o: Outcome): Cells => Object.fromEntries(PRINCIPALS.map((p) => [p, o])) as Cells;
const signedIn = (anon: Outcome, rest: Outcome): Cells => ({ ...everyone(rest), anon });
/** API: 401 without credentials, 403 for a role without the scope. */
function api(allowed: Role[], otherCustomer?: Outcome): Cells {
	const cells = { ...roles(...allowed), anon: 'unauth' as Outcome };
	if (otherCustomer) cells.otherCustomer = otherCustomer;
	return cells;
}
const ALL_ROLES: Role[] = [...PLANT, 'customer'];

/** Pages (GET), keyed by route id. */
export const PAGES: Record<string, Cells> = {
	'/': signedIn('login', 'home'),
	'/account': signedIn('login', 'ok'),
	'/admin/audit': roles('admin'),
	'/admin/invites': roles('admin'),
	'/admin/data': roles('admin'),
	'/admin/outbox': roles('admin'),
	'/admin/api': roles('admin'),
	'/admin/tokens': roles('admin'),
	'/admin/users': roles('admin'),
	'/board': roles(...PLANT),
	'/board/slots': roles(...PLANT),
	'/bookings': roles(...PLANT),
	'/bookings/[id]': roles(...PLANT),
	'/bookings/[id]/edit': roles(...PLANNERS),
	'/bookings/new': roles(...PLANNERS),
	'/dies': roles(...PLANT),
	'/dies/[number]': roles(...PLANT),
	'/dies/[number]/bookings': roles(...PLANT),
	'/dies/[number]/cooling': roles(...PLANT),
	'/dies/[number]/edit': roles(...LEADS),
	'/dies/[number]/jobs': roles(...PLANT),
	'/dies/[number]/label': roles(...PLANT),
	'/dies/[number]/plan': roles(...PLANT),
	'/dies/[number]/sharing': roles(...LEADS),
	'/dies/[number]/shots': roles(...PLANT),
	'/dies/[number]/surface': roles(...PLANT),
	'/dies/import': roles(...LEADS),
	'/dies/new': roles(...LEADS),
	'/fleet': roles(...LEADS),
	// An unknown or used invitation link shows a plain "not valid" page to anyone.
	'/invite/[token]': everyone('ok'),
	'/jobs': roles(...PLANT),
	'/jobs/[job]': roles(...PLANT),
	'/order-check': roles('admin', 'toolroom_lead', 'scheduler'),
	'/owner': roles('customer'),
	'/owner/access': roles('customer'),
	'/owner/statements': roles('customer'),
	'/owner/dies/[number]': ownTooling(),
	'/photos/[id]': { ...signedIn('login', 'ok'), otherCustomer: 'none' },
	'/planner': roles(...PLANNERS),
	'/plant': roles('admin'),
	'/presses': roles(...PLANT),
	'/presses/[id]': roles(...PLANT),
	'/presses/new': roles(...PLANNERS),
	'/settings': roles('admin'),
	'/shots': roles(...RECORDERS),
	'/shots/new': roles(...RECORDERS),
	'/shots/upload': roles(...RECORDERS),
	'/sign-in': signedIn('ok', 'home'),
	'/service-windows': roles(...PLANT),
	'/sign-out': signedIn('home', 'home'),
	'/toolroom': roles(...WORKERS)
};

/** Form actions (POST with an empty form), keyed by `route id?/action`. */
export const ACTIONS: Record<string, Cells> = {
	'/account?/password': signedIn('login', 'ok'),
	'/account?/preferences': signedIn('login', 'ok'),
	'/admin/invites?/create': roles('admin'),
	'/admin/invites?/renew': roles('admin'),
	'/admin/invites?/withdraw': roles('admin'),
	'/admin/outbox?/resend': roles('admin'),
	'/admin/outbox?/resendFailed': roles('admin'),
	'/admin/outbox?/runNow': roles('admin'),
	'/admin/tokens?/create': roles('admin'),
	'/admin/tokens?/revoke': roles('admin'),
	'/admin/users?/active': roles('admin'),
	'/admin/users?/create': roles('admin'),
	'/admin/users?/reset': roles('admin'),
	'/admin/users?/role': roles('admin'),
	'/bookings/[id]?/cancel': roles(...PLANNERS),
	'/service-windows?/reserve': roles('admin', 'toolroom_lead', 'scheduler'),
	'/service-windows?/cancel': roles('admin', 'toolroom_lead', 'scheduler'),
	'/service-windows?/start': roles(...WORKERS),
	'/bookings/[id]/edit?/default': roles(...PLANNERS),
	'/bookings/new?/default': roles(...PLANNERS),
	'/dies/[number]?/status': roles(...PLANT),
	'/dies/[number]?/askOwner': roles(...LEADS),
	'/dies/[number]/cooling?/check': roles(...WORKERS),
	'/dies/[number]/cooling?/correctCheck': roles(...LEADS),
	'/dies/[number]/cooling?/voidCheck': roles(...LEADS),
	'/dies/[number]/cooling?/circuit': roles(...WORKERS),
	'/dies/[number]/cooling?/lock': roles(...LEADS),
	'/dies/[number]/edit?/default': roles(...LEADS),
	'/dies/[number]/jobs?/open': roles(...WORKERS),
	'/dies/[number]/plan?/add': roles(...LEADS),
	'/dies/[number]/plan?/deactivate': roles(...LEADS),
	'/dies/[number]/plan?/done': roles(...WORKERS),
	'/dies/[number]/plan?/intervals': roles(...LEADS),
	'/dies/[number]/sharing?/job': roles(...LEADS),
	'/dies/[number]/sharing?/photo': roles(...LEADS),
	'/dies/[number]/shots?/changeEntry': roles(...LEADS),
	'/dies/[number]/shots?/correct': roles(...LEADS),
	'/dies/[number]/shots?/replaceHalf': roles(...LEADS),
	'/dies/[number]/surface?/correctInspection': roles(...LEADS),
	'/dies/[number]/surface?/inspect': roles(...WORKERS),
	'/dies/[number]/surface?/voidInspection': roles(...LEADS),
	'/dies/[number]/surface?/zone': roles(...LEADS),
	'/dies/import?/commit': roles(...LEADS),
	'/dies/import?/fix': roles(...LEADS),
	'/dies/import?/mapping': roles(...LEADS),
	'/dies/import?/mode': roles(...LEADS),
	'/dies/import?/resolve': roles(...LEADS),
	'/dies/import?/skip': roles(...LEADS),
	'/dies/import?/upload': roles(...LEADS),
	'/dies/new?/default': roles(...LEADS),
	'/invite/[token]?/default': everyone('ok'),
	'/jobs/[job]?/assign': roles(...WORKERS),
	'/jobs/[job]?/cancel': roles(...WORKERS),
	'/jobs/[job]?/close': roles(...WORKERS),
	'/jobs/[job]?/part': roles(...WORKERS),
	'/jobs/[job]?/repair': roles(...WORKERS),
	'/jobs/[job]?/share': roles(...WORKERS),
	'/jobs/[job]?/status': roles(...WORKERS),
	'/jobs/[job]?/upload': roles(...WORKERS),
	'/jobs/[job]?/void': roles(...LEADS),
	'/owner/dies/[number]?/answer': ownTooling(),
	'/photos/[id]?/caption': roles(...LEADS),
	'/jobs/[job]?/voidEntry': roles(...LEADS),
	'/jobs/[job]?/work': roles(...WORKERS),
	'/presses/[id]?/delete': roles(...PLANNERS),
	'/presses/[id]?/save': roles(...PLANNERS),
	'/presses/new?/default': roles(...PLANNERS),
	'/settings?/alloy': roles('admin'),
	'/settings?/customer': roles('admin'),
	'/settings?/identity': roles('admin'),
	'/settings?/leadDefaults': roles('admin'),
	'/settings?/logo': roles('admin'),
	'/settings?/zone': roles('admin'),
	'/shots/new?/default': roles(...RECORDERS),
	'/shots/upload?/commit': roles(...RECORDERS),
	'/shots/upload?/preview': roles(...RECORDERS),
	'/sign-in?/default': signedIn('ok', 'home'),
	'/sign-out?/default': everyone('login')
};

/** Endpoints (+server.ts), keyed by `METHOD route id`. */
export const ENDPOINTS: Record<string, Cells> = {
	'GET /api/v1/board': api(ALL_ROLES),
	'GET /api/v1/bookings': api(ALL_ROLES),
	'POST /api/v1/bookings': api(PLANNERS),
	'PATCH /api/v1/bookings/[id]': api(PLANNERS),
	'GET /api/v1/dies': api(ALL_ROLES),
	'GET /api/v1/dies/[number]': api(ALL_ROLES, 'none'),
	'GET /api/v1/dies/[number]/order-check': api(ALL_ROLES, 'none'),
	'GET /api/v1/openapi.json': api(ALL_ROLES),
	'GET /api/v1/presses/[press]/mounted': api(RECORDERS),
	'POST /api/v1/shots': api(RECORDERS),
	'GET /admin/data/export.zip': roles('admin'),
	'GET /dies/export.csv': roles(...PLANT),
	'GET /favicon.svg': everyone('ok'),
	'GET /plant-logo': everyone('ok'),
	'GET /dies/import/template.csv': roles(...LEADS),
	'GET /dies/import/template.xlsx': roles(...LEADS),
	'GET /jobs/export.csv': roles(...PLANT),
	'GET /jobs/[job]/report.pdf': roles(...PLANT),
	'GET /owner/dies/[number]/ledger.csv': ownTooling(),
	'GET /owner/export.csv': roles('customer'),
	'GET /owner/statement.pdf': roles('customer'),
	'GET /owner/statement.csv': roles('customer'),
	'GET /photos/[id]/[variant]': { ...signedIn('login', 'ok'), otherCustomer: 'none' },
	'GET /shots/die-summary': roles(...RECORDERS),
	'GET /shots/export.csv': roles(...RECORDERS),
	'GET /shots/upload/template.csv': roles(...RECORDERS)
};
