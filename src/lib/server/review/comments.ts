// Comments and mentions. A comment belongs to a survey of the organisation and, for a board,
// point or route, to one of its boards (a point or route must exist on the board when the
// comment is written). Replies join the thread of the comment they answer. Every member of the
// organisation mentioned in a body is e-mailed once per comment, through the mail outbox.
import type { DB } from '../db/index';
import type { Mailer } from '../mail/mailer';
import type { CommentTargetKind } from '../db/review-types';
import { maps } from '../../board/model';
import { parseMentions, plainBody } from '../../survey/mentions';
import { readBoardDocIn } from './revisions';

export class CommentError extends Error {
	constructor(
		readonly status: 400 | 403 | 404 | 409,
		message: string,
		readonly field?: string
	) {
		super(message);
	}
}

export interface CommentView {
	id: string;
	targetKind: CommentTargetKind;
	boardId: string | null;
	targetId: string | null;
	parentId: string | null;
	authorId: string | null;
	authorName: string;
	body: string;
	createdAt: string;
	editedAt: string | null;
}

export interface ThreadView extends CommentView {
	replies: CommentView[];
}

const iso = (d: Date | string) => new Date(d).toISOString();

function view(r: {
	id: string;
	target_kind: CommentTargetKind;
	board_id: string | null;
	target_id: string | null;
	parent_id: string | null;
	author_user_id: string | null;
	author_name: string | null;
	body: string;
	created_at: Date;
	edited_at: Date | null;
}): CommentView {
	return {
		id: r.id,
		targetKind: r.target_kind,
		boardId: r.board_id,
		targetId: r.target_id,
		parentId: r.parent_id,
		authorId: r.author_user_id,
		authorName: r.author_name ?? 'A former member',
		body: r.body,
		createdAt: iso(r.created_at),
		editedAt: r.edited_at ? iso(r.edited_at) : null
	};
}

function base(db: DB, organisationId: string) {
	return db
		.selectFrom('comment')
		.leftJoin('app_user', 'app_user.id', 'comment.author_user_id')
		.select([
			'comment.id',
			'comment.survey_id',
			'comment.target_kind',
			'comment.board_id',
			'comment.target_id',
			'comment.parent_id',
			'comment.author_user_id',
			'app_user.name as author_name',
			'comment.body',
			'comment.created_at',
			'comment.edited_at'
		])
		.where('comment.organisation_id', '=', organisationId);
}

/**
 * Threads of a survey, oldest first, each with its replies. Filters: a board (its board, point
 * and route comments), a kind of target, a point or route id.
 */
export async function listThreads(
	db: DB,
	organisationId: string,
	surveyId: string,
	filter: { boardId?: string; targetKind?: CommentTargetKind; targetId?: string } = {}
): Promise<ThreadView[]> {
	let q = base(db, organisationId).where('comment.survey_id', '=', surveyId).where('comment.parent_id', 'is', null);
	if (filter.boardId) q = q.where('comment.board_id', '=', filter.boardId);
	if (filter.targetKind) q = q.where('comment.target_kind', '=', filter.targetKind);
	if (filter.targetId) q = q.where('comment.target_id', '=', filter.targetId);
	const roots = await q.orderBy('comment.created_at').orderBy('comment.id').limit(500).execute();
	if (roots.length === 0) return [];
	const replies = await base(db, organisationId)
		.where(
			'comment.parent_id',
			'in',
			roots.map((r) => r.id)
		)
		.orderBy('comment.created_at')
		.orderBy('comment.id')
		.execute();
	return roots.map((r) => ({ ...view(r), replies: replies.filter((x) => x.parent_id === r.id).map(view) }));
}

export async function getComment(db: DB, organisationId: string, id: string) {
	return base(db, organisationId).where('comment.id', '=', id).executeTakeFirst();
}

/** Members who can be mentioned: everyone in the organisation. */
export function mentionableMembers(db: DB, organisationId: string) {
	return db
		.selectFrom('member')
		.innerJoin('app_user', 'app_user.id', 'member.user_id')
		.select(['app_user.id', 'app_user.name', 'app_user.email'])
		.where('member.organisation_id', '=', organisationId)
		.orderBy('app_user.name')
		.execute();
}

export interface CommentAuthor {
	userId: string;
	name: string;
}

export interface NewComment {
	surveyId: string;
	targetKind: CommentTargetKind;
	boardId?: string | null;
	targetId?: string | null;
	parentId?: string | null;
	body: string;
}

export interface MailContext {
	mailer: Mailer;
	/** The app's public URL, for the link in the e-mail. */
	origin: string;
}

/** Creates a comment (or a reply), records its mentions, and e-mails each mentioned member once. */
export async function createComment(
	db: DB,
	organisationId: string,
	author: CommentAuthor,
	input: NewComment,
	mail: MailContext
): Promise<CommentView> {
	const survey = await db
		.selectFrom('survey')
		.select(['id', 'title'])
		.where('organisation_id', '=', organisationId)
		.where('id', '=', input.surveyId)
		.executeTakeFirst();
	if (!survey) throw new CommentError(404, 'No such survey in your organisation.');

	let target: { kind: CommentTargetKind; boardId: string | null; targetId: string | null; parentId: string | null };
	if (input.parentId) {
		const parent = await getComment(db, organisationId, input.parentId);
		if (!parent || parent.survey_id !== survey.id) throw new CommentError(404, 'No such comment on this survey.', 'parentId');
		// A reply to a reply joins the thread's first comment: threads are one level deep.
		target = { kind: parent.target_kind, boardId: parent.board_id, targetId: parent.target_id, parentId: parent.parent_id ?? parent.id };
	} else {
		target = { kind: input.targetKind, boardId: null, targetId: null, parentId: null };
		if (input.targetKind !== 'survey') {
			if (!input.boardId) throw new CommentError(400, 'Which board?', 'boardId');
			const board = await db
				.selectFrom('board')
				.select('id')
				.where('organisation_id', '=', organisationId)
				.where('survey_id', '=', survey.id)
				.where('id', '=', input.boardId)
				.executeTakeFirst();
			if (!board) throw new CommentError(404, 'No such board on this survey.', 'boardId');
			target.boardId = board.id;
			if (input.targetKind === 'point' || input.targetKind === 'route') {
				if (!input.targetId) throw new CommentError(400, `Which ${input.targetKind}?`, 'targetId');
				const doc = await readBoardDocIn(db, board.id);
				try {
					const m = maps(doc);
					const exists = (input.targetKind === 'point' ? m.points : m.routes).has(input.targetId);
					if (!exists) throw new CommentError(404, `No such ${input.targetKind} on this board.`, 'targetId');
				} finally {
					doc.destroy();
				}
				target.targetId = input.targetId;
			}
		}
	}

	const mentioned = await resolveMentions(db, organisationId, input.body, author.userId);
	const row = await db.transaction().execute(async (trx) => {
		const c = await trx
			.insertInto('comment')
			.values({
				organisation_id: organisationId,
				survey_id: survey.id,
				board_id: target.boardId,
				target_kind: target.kind,
				target_id: target.targetId,
				parent_id: target.parentId,
				author_user_id: author.userId,
				body: input.body
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		if (mentioned.length) {
			await trx
				.insertInto('comment_mention')
				.values(mentioned.map((m) => ({ comment_id: c.id, organisation_id: organisationId, user_id: m.id })))
				.onConflict((oc) => oc.doNothing())
				.execute();
		}
		return c;
	});
	await notifyMentions(
		db,
		organisationId,
		row.id,
		{ author, surveyId: survey.id, surveyTitle: survey.title, body: input.body, target: { kind: target.kind, boardId: target.boardId } },
		mail
	);
	const stored = await getComment(db, organisationId, row.id);
	return view(stored!);
}

/** Changes the body of one's own comment; new mentions are told, earlier ones are not told again. */
export async function editComment(
	db: DB,
	organisationId: string,
	author: CommentAuthor,
	id: string,
	body: string,
	mail: MailContext
): Promise<CommentView> {
	const c = await getComment(db, organisationId, id);
	if (!c) throw new CommentError(404, 'No such comment in your organisation.');
	if (c.author_user_id !== author.userId) throw new CommentError(403, 'Only the author can change a comment.');
	const survey = await db.selectFrom('survey').select(['id', 'title']).where('id', '=', c.survey_id).executeTakeFirstOrThrow();
	const mentioned = await resolveMentions(db, organisationId, body, author.userId);
	await db.transaction().execute(async (trx) => {
		await trx.updateTable('comment').set({ body, edited_at: new Date() }).where('id', '=', id).execute();
		if (mentioned.length) {
			await trx
				.insertInto('comment_mention')
				.values(mentioned.map((m) => ({ comment_id: id, organisation_id: organisationId, user_id: m.id })))
				.onConflict((oc) => oc.doNothing())
				.execute();
		}
	});
	await notifyMentions(
		db,
		organisationId,
		id,
		{ author, surveyId: survey.id, surveyTitle: survey.title, body, target: { kind: c.target_kind, boardId: c.board_id } },
		mail
	);
	return view((await getComment(db, organisationId, id))!);
}

/** Members of the organisation the body mentions (by id or e-mail), the author left out. */
async function resolveMentions(db: DB, organisationId: string, body: string, authorId: string) {
	const refs = parseMentions(body);
	if (refs.userIds.length === 0 && refs.emails.length === 0) return [];
	const rows = await db
		.selectFrom('member')
		.innerJoin('app_user', 'app_user.id', 'member.user_id')
		.select(['app_user.id', 'app_user.email', 'app_user.name'])
		.where('member.organisation_id', '=', organisationId)
		.where((eb) =>
			eb.or([
				...(refs.userIds.length ? [eb('app_user.id', 'in', refs.userIds)] : []),
				...(refs.emails.length ? [eb(eb.fn('lower', ['app_user.email']), 'in', refs.emails)] : [])
			])
		)
		.execute();
	const seen = new Set<string>();
	return rows.filter((r) => r.id !== authorId && !seen.has(r.id) && seen.add(r.id));
}

/**
 * E-mails every mention of a comment not told yet. The row is claimed (notified_at set) before
 * the mail is written, so two requests never both send it.
 */
async function notifyMentions(
	db: DB,
	organisationId: string,
	commentId: string,
	c: {
		author: CommentAuthor;
		surveyId: string;
		surveyTitle: string;
		body: string;
		target: { kind: CommentTargetKind; boardId: string | null };
	},
	mail: MailContext
) {
	const claimed = await db
		.updateTable('comment_mention')
		.set({ notified_at: new Date() })
		.from('app_user')
		.whereRef('app_user.id', '=', 'comment_mention.user_id')
		.where('comment_mention.comment_id', '=', commentId)
		.where('comment_mention.organisation_id', '=', organisationId)
		.where('comment_mention.notified_at', 'is', null)
		.returning(['app_user.email', 'app_user.name'])
		.execute();
	const link =
		c.target.boardId && c.target.kind !== 'survey'
			? `${mail.origin}/surveys/${c.surveyId}/boards/${c.target.boardId}`
			: `${mail.origin}/surveys/${c.surveyId}#comments`;
	const where = c.target.kind === 'survey' ? 'the survey' : `a ${c.target.kind}`;
	for (const m of claimed) {
		// To the person mentioned only (their own mail, not shown in the organisation's outbox).
		await mail.mailer.queue(db, {
			purpose: 'mention',
			organisationId,
			to: m.email,
			subject: `${c.author.name} mentioned you on “${c.surveyTitle}”`,
			text: `Hello ${m.name},\n\n${c.author.name} mentioned you in a comment on ${where} of the survey “${c.surveyTitle}”:\n\n${plainBody(c.body)}\n\nOpen it: ${link}\n`
		});
	}
}

/** Recent mentions of a member, newest first, for their overview. */
export function mentionsOf(db: DB, organisationId: string, userId: string, limit = 10) {
	return db
		.selectFrom('comment_mention')
		.innerJoin('comment', 'comment.id', 'comment_mention.comment_id')
		.innerJoin('survey', 'survey.id', 'comment.survey_id')
		.leftJoin('app_user', 'app_user.id', 'comment.author_user_id')
		.select([
			'comment.id',
			'comment.survey_id',
			'comment.board_id',
			'comment.target_kind',
			'comment.body',
			'comment.created_at',
			'survey.title as survey_title',
			'app_user.name as author_name'
		])
		.where('comment_mention.organisation_id', '=', organisationId)
		.where('comment_mention.user_id', '=', userId)
		.where('survey.archived_at', 'is', null)
		.orderBy('comment.created_at', 'desc')
		.limit(limit)
		.execute();
}
