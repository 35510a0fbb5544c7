import type { DB } from './index';

export async function record(
	db: DB,
	e: {
		organisationId: string | null;
		actorUserId: string | null;
		action: string;
		subjectType?: string;
		subjectId?: string;
		data?: Record<string, unknown>;
	}
) {
	await db
		.insertInto('audit_event')
		.values({
			organisation_id: e.organisationId,
			actor_user_id: e.actorUserId,
			action: e.action,
			subject_type: e.subjectType ?? null,
			subject_id: e.subjectId ?? null,
			data: JSON.stringify(e.data ?? {})
		})
		.execute();
}
