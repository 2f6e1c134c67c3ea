import type { RoleName } from './roles';

export interface NavItem {
	href: string;
	label: string;
}

// The links each role sees. Hiding a link protects nothing: every route checks the role itself.
export const NAV: Record<RoleName, NavItem[]> = {
	admin: [
		{ href: '/plant', label: 'Plant' },
		{ href: '/dies', label: 'Die register' },
		{ href: '/shots', label: 'Shot ledger' },
		{ href: '/jobs', label: 'Toolroom jobs' },
		{ href: '/board', label: 'Availability' },
		{ href: '/presses', label: 'Presses' },
		{ href: '/fleet', label: 'Fleet life' },
		{ href: '/admin/users', label: 'Users' },
		{ href: '/admin/tokens', label: 'API tokens' },
		{ href: '/admin/api', label: 'API' },
		{ href: '/admin/invites', label: 'Invitations' },
		{ href: '/admin/outbox', label: 'Outbox' },
		{ href: '/admin/audit', label: 'Audit log' },
		{ href: '/admin/data', label: 'Import and export' },
		{ href: '/settings', label: 'Settings' }
	],
	toolroom_lead: [
		{ href: '/toolroom', label: 'Toolroom' },
		{ href: '/jobs', label: 'Toolroom jobs' },
		{ href: '/dies', label: 'Die register' },
		{ href: '/shots', label: 'Shot ledger' },
		{ href: '/fleet', label: 'Fleet life' }
	],
	toolmaker: [
		{ href: '/toolroom', label: 'Toolroom' },
		{ href: '/jobs', label: 'Toolroom jobs' },
		{ href: '/dies', label: 'Die register' }
	],
	scheduler: [
		{ href: '/planner', label: 'Planner' },
		{ href: '/board', label: 'Availability' },
		{ href: '/order-check', label: 'Order check' },
		{ href: '/presses', label: 'Presses' },
		{ href: '/dies', label: 'Die register' },
		{ href: '/shots', label: 'Shot ledger' }
	],
	customer: [
		{ href: '/owner', label: 'My tooling' },
		{ href: '/owner/access', label: 'API access' }
	]
};
