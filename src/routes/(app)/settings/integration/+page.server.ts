import { fail } from '@sveltejs/kit';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { rowRefSchema } from '$lib/schemas/ids';
import { tokenCreateSchema, webhookCreateSchema } from '$lib/schemas/integration';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as members from '$lib/server/db/members';
import { createToken, listTokens, revokeToken, TokenError } from '$lib/server/auth/api-tokens';
import { createWebhook, disableWebhook, listDeliveries, listWebhooks, WebhookError } from '$lib/server/integration/webhooks';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'integration.manage', url);
	const db = context().handle.db;
	const [tokens, people, hooks, deliveries] = await Promise.all([
		listTokens(db, viewer.organisationId),
		members.list(db, viewer.organisationId),
		listWebhooks(db, viewer.organisationId),
		listDeliveries(db, viewer.organisationId, 50)
	]);
	const now = Date.now();
	return {
		tokens: tokens.map((t) => ({
			id: t.id,
			kind: t.kind,
			name: t.name,
			actsAs: t.acts_as,
			role: t.kind === 'service' ? t.role : t.member_role,
			scope: t.scope,
			prefix: t.prefix,
			createdAt: new Date(t.created_at).toISOString(),
			expiresAt: new Date(t.expires_at).toISOString(),
			lastUsedAt: t.last_used_at ? new Date(t.last_used_at).toISOString() : null,
			state: t.revoked_at ? 'revoked' : new Date(t.expires_at).getTime() <= now ? 'expired' : 'active'
		})),
		people: people.map((m) => ({ value: m.user_id, label: `${m.name} (${m.role})` })),
		webhooks: hooks.map((h) => ({
			id: h.id,
			url: h.url,
			events: h.events,
			description: h.description,
			createdAt: new Date(h.created_at).toISOString(),
			disabled: h.disabled_at !== null
		})),
		deliveries: deliveries.map((d) => ({
			id: d.id,
			event: d.event,
			url: d.url,
			status: d.status,
			attempts: d.attempts,
			lastStatusCode: d.last_status_code,
			lastError: d.last_error,
			createdAt: new Date(d.created_at).toISOString(),
			lastAttemptAt: d.last_attempt_at ? new Date(d.last_attempt_at).toISOString() : null
		})),
		policy: context().config.webhookPolicy
	};
};

const tokenRef = rowRefSchema('This token could not be identified: reload the page and try again.');
const hookRef = rowRefSchema('This webhook could not be identified: reload the page and try again.');

export const actions: Actions = {
	createToken: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'integration.manage', url);
		const form = parseForm(await request.formData(), tokenCreateSchema);
		if (!form.ok) return fail(400, { action: 'createToken', values: form.values, errors: form.errors });
		try {
			const { secret, token } = await createToken(context().handle.db, viewer.organisationId, viewer.userId, form.data);
			return { action: 'createToken', secret, name: token.name };
		} catch (e) {
			if (e instanceof TokenError)
				return fail(400, { action: 'createToken', values: form.values, errors: { [e.field]: e.message } as FieldErrors });
			throw e;
		}
	},
	revokeToken: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'integration.manage', url);
		const ref = parseForm(await request.formData(), tokenRef);
		if (!ref.ok) return fail(400, { action: 'revokeToken', errors: { _: ref.errors.id } as FieldErrors });
		const done = await revokeToken(context().handle.db, viewer.organisationId, ref.data.id, viewer.userId);
		if (!done) return fail(404, { action: 'revokeToken', errors: { _: 'No such active token in your organisation.' } as FieldErrors });
		return { action: 'revokeToken', revoked: true };
	},
	createWebhook: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'integration.manage', url);
		const data = await request.formData();
		const events = data.getAll('events').filter((e): e is string => typeof e === 'string');
		const values: Record<string, string> = {
			url: String(data.get('url') ?? ''),
			description: String(data.get('description') ?? ''),
			events: events.join(',')
		};
		const parsed = webhookCreateSchema.safeParse({ url: data.get('url'), description: data.get('description') ?? '', events });
		if (!parsed.success) {
			const errors: FieldErrors = {};
			for (const i of parsed.error.issues) errors[String(i.path[0] ?? '_')] ??= i.message;
			return fail(400, { action: 'createWebhook', values, errors });
		}
		try {
			const { secret } = await createWebhook(
				context().handle.db,
				viewer.organisationId,
				viewer.userId,
				parsed.data,
				context().config.webhookPolicy
			);
			return { action: 'createWebhook', secret, url: parsed.data.url };
		} catch (e) {
			if (e instanceof WebhookError) return fail(400, { action: 'createWebhook', values, errors: { [e.field]: e.message } as FieldErrors });
			throw e;
		}
	},
	disableWebhook: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'integration.manage', url);
		const ref = parseForm(await request.formData(), hookRef);
		if (!ref.ok) return fail(400, { action: 'disableWebhook', errors: { _: ref.errors.id } as FieldErrors });
		const done = await disableWebhook(context().handle.db, viewer.organisationId, ref.data.id, viewer.userId);
		if (!done) return fail(404, { action: 'disableWebhook', errors: { _: 'No such active webhook in your organisation.' } as FieldErrors });
		return { action: 'disableWebhook', disabled: true };
	}
};
