// The one place that decides who may do what. Every load, action, API route and the socket
// handshake asks here; hiding a button is never the protection.
import type { Role } from '../db/types';

export const ROLES: readonly Role[] = ['admin', 'engineer', 'technician', 'viewer'] as const;

export const ROLE_LABEL: Record<Role, string> = {
	admin: 'Admin',
	engineer: 'Engineer',
	technician: 'Technician',
	viewer: 'Viewer'
};

/** Every guarded action, with the roles allowed. Later features add their actions here. */
export const PERMISSIONS = {
	'organisation.read': ['admin', 'engineer', 'technician', 'viewer'],
	'organisation.manage': ['admin'],
	'member.read': ['admin', 'engineer', 'technician', 'viewer'],
	'member.invite': ['admin'],
	'member.change-role': ['admin'],
	'member.remove': ['admin'],
	'mail.outbox.read': ['admin'],
	'thresholds.read': ['admin', 'engineer', 'technician', 'viewer'],
	'thresholds.edit': ['admin', 'engineer'],
	'register.read': ['admin', 'engineer', 'technician', 'viewer'],
	'register.write': ['admin', 'engineer'],
	'register.field-edit': ['admin', 'engineer', 'technician'],
	'media.upload': ['admin', 'engineer', 'technician'],
	'survey.read': ['admin', 'engineer', 'technician', 'viewer'],
	'survey.plan': ['admin', 'engineer'],
	'survey.start': ['admin', 'engineer', 'technician'],
	'survey.submit': ['admin', 'engineer', 'technician'],
	'survey.review': ['admin', 'engineer'],
	'survey.reopen': ['admin', 'engineer'],
	'survey.close': ['admin', 'engineer'],
	'survey.archive': ['admin', 'engineer'],
	'board.read': ['admin', 'engineer', 'technician', 'viewer'],
	'board.write': ['admin', 'engineer', 'technician'],
	'review.decide': ['admin', 'engineer'],
	'comment.write': ['admin', 'engineer', 'technician', 'viewer'],
	'job.read': ['admin', 'engineer', 'technician', 'viewer'],
	'job.issue': ['admin', 'engineer'],
	'job.record': ['admin', 'engineer', 'technician'],
	'job.close': ['admin', 'engineer'],
	'audit.read': ['admin', 'engineer'],
	'integration.manage': ['admin']
} as const satisfies Record<string, readonly Role[]>;

export type Action = keyof typeof PERMISSIONS;
export const ACTIONS = Object.keys(PERMISSIONS) as Action[];

export function can(role: Role | null | undefined, action: Action): boolean {
	if (!role) return false;
	return (PERMISSIONS[action] as readonly Role[]).includes(role);
}

/** Actions that only read; a read-only API token is limited to these. */
export function isReadAction(action: Action): boolean {
	return action.endsWith('.read');
}

export function isRole(value: unknown): value is Role {
	return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}
