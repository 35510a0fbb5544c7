import { error, fail } from '@sveltejs/kit';
import { invitationCreateSchema, memberRoleSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { rowRefSchema } from '$lib/schemas/ids';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as members from '$lib/server/db/members';
import * as invitations from '$lib/server/db/invitations';
import { AccountError, invite } from '$lib/server/auth/accounts';
import { record } from '$lib/server/db/audit';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'member.read', url);
	const db = context().handle.db;
	const canInvite = can(viewer.role, 'member.invite');
	const [list, open] = await Promise.all([
		members.list(db, viewer.organisationId),
		canInvite ? invitations.listOpen(db, viewer.organisationId) : Promise.resolve([])
	]);
	return {
		members: list.map((m) => ({ id: m.id, name: m.name, email: m.email, role: m.role, isMe: m.user_id === viewer.userId })),
		invitations: open,
		canInvite,
		canChangeRoles: can(viewer.role, 'member.change-role')
	};
};

// The hidden `id` of the row a button acts on; anything but a uuid is a 400, never a query.
const memberRef = rowRefSchema('This member could not be identified: reload the page and try again.');
const invitationRef = rowRefSchema('This invitation could not be identified: reload the page and try again.');

export const actions: Actions = {
	invite: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'member.invite', url);
		const form = parseForm(await request.formData(), invitationCreateSchema);
		if (!form.ok) return fail(400, { action: 'invite', values: form.values, errors: form.errors });
		const { handle, mailer, config, throttle } = context();
		const limit = await throttle.request('invite', { organisation: viewer.organisationId });
		if (!limit.ok) {
			return fail(429, {
				action: 'invite',
				values: form.values,
				errors: { _: 'Too many invitations from this organisation. Wait a while and try again.' } as FieldErrors
			});
		}
		try {
			await invite(handle.db, mailer, config.origin, {
				organisationId: viewer.organisationId,
				organisationName: viewer.organisationName,
				invitedBy: { id: viewer.userId, name: viewer.name },
				email: form.data.email,
				role: form.data.role
			});
		} catch (e) {
			if (e instanceof AccountError)
				return fail(e.status, { action: 'invite', values: form.values, errors: { [e.field ?? '_']: e.message } as FieldErrors });
			throw e;
		}
		return { action: 'invite', invited: form.data.email };
	},
	revoke: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'member.invite', url);
		const ref = parseForm(await request.formData(), invitationRef);
		if (!ref.ok) return fail(400, { action: 'revoke', errors: { _: ref.errors.id } as FieldErrors });
		const { id } = ref.data;
		const db = context().handle.db;
		if (!(await invitations.revoke(db, viewer.organisationId, id))) error(404, 'No such open invitation');
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'invitation.revoked',
			subjectType: 'invitation',
			subjectId: id
		});
		return { action: 'revoke', revoked: true };
	},
	role: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'member.change-role', url);
		const data = await request.formData();
		const ref = parseForm(data, memberRef);
		if (!ref.ok) return fail(400, { action: 'role', id: '', errors: { role: ref.errors.id } as FieldErrors });
		const { id } = ref.data;
		const form = parseForm(data, memberRoleSchema);
		if (!form.ok) return fail(400, { action: 'role', id, errors: form.errors });
		const db = context().handle.db;
		try {
			const changed = await members.changeRole(db, viewer.organisationId, id, form.data.role);
			if (!changed) error(404, 'No such member');
		} catch (e) {
			if (e instanceof members.LastAdminError) return fail(409, { action: 'role', id, errors: { role: e.message } as FieldErrors });
			throw e;
		}
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'member.role-changed',
			subjectType: 'member',
			subjectId: id,
			data: { role: form.data.role }
		});
		return { action: 'role', id, saved: true };
	},
	remove: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'member.remove', url);
		const ref = parseForm(await request.formData(), memberRef);
		if (!ref.ok) return fail(400, { action: 'remove', id: '', errors: { _: ref.errors.id } as FieldErrors });
		const { id } = ref.data;
		const db = context().handle.db;
		try {
			const removed = await members.remove(db, viewer.organisationId, id);
			if (!removed) error(404, 'No such member');
		} catch (e) {
			if (e instanceof members.LastAdminError) return fail(409, { action: 'remove', id, errors: { _: e.message } as FieldErrors });
			throw e;
		}
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'member.removed',
			subjectType: 'member',
			subjectId: id
		});
		return { action: 'remove', removed: true };
	}
};
