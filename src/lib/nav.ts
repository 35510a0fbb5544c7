import type { Action } from '$lib/server/auth/guard';

// The main navigation. Each feature adds its entry; `action` hides links the role cannot use
// (the routes themselves are guarded on the server).
export interface NavItem {
	href: string;
	label: string;
	action: Action;
}

export const NAV: NavItem[] = [
	{ href: '/', label: 'Overview', action: 'organisation.read' },
	{ href: '/register', label: 'Register', action: 'register.read' },
	{ href: '/surveys', label: 'Surveys', action: 'survey.read' },
	{ href: '/jobs', label: 'Jobs', action: 'job.read' },
	{ href: '/calculators', label: 'Calculators', action: 'register.read' },
	{ href: '/settings/members', label: 'Team', action: 'member.read' },
	{ href: '/settings/organisation', label: 'Settings', action: 'organisation.read' }
];
