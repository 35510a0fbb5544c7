// Comments on a survey, a board, or a point or route of a board: the API's request bodies and
// query strings.
import { z } from 'zod';

export const COMMENT_MAX = 4000;
export const COMMENT_TARGET_KINDS = ['survey', 'board', 'point', 'route'] as const;
export type CommentTargetKind = (typeof COMMENT_TARGET_KINDS)[number];

const body = z
	.string({ error: 'Write the comment.' })
	.trim()
	.min(1, 'Write the comment.')
	.max(COMMENT_MAX, `A comment has at most ${COMMENT_MAX} characters.`);

/** Yjs item ids of points and routes (what newId() makes), or anything of that shape. */
const itemId = z
	.string()
	.trim()
	.min(1, 'Which point or route?')
	.max(100)
	.regex(/^[A-Za-z0-9_-]+$/, 'Not a point or route id.');

export const commentCreateSchema = z
	.object({
		targetKind: z.enum(COMMENT_TARGET_KINDS, { error: 'Comment on the survey, a board, a point or a route.' }).default('survey'),
		boardId: z.uuid({ error: 'Not a board id.' }).nullish(),
		targetId: itemId.nullish(),
		parentId: z.uuid({ error: 'Not a comment id.' }).nullish(),
		body
	})
	.strict()
	.superRefine((v, ctx) => {
		if (v.parentId) return; // a reply takes its target from the thread
		if (v.targetKind !== 'survey' && !v.boardId) ctx.addIssue({ code: 'custom', path: ['boardId'], message: 'Which board?' });
		if ((v.targetKind === 'point' || v.targetKind === 'route') && !v.targetId)
			ctx.addIssue({ code: 'custom', path: ['targetId'], message: `Which ${v.targetKind}?` });
	});
export type CommentCreate = z.infer<typeof commentCreateSchema>;

export const commentReplySchema = z.object({ body }).strict();
export const commentEditSchema = z.object({ body }).strict();

export const commentListQuerySchema = z.object({
	boardId: z.uuid({ error: 'Not a board id.' }).optional(),
	targetKind: z.enum(COMMENT_TARGET_KINDS, { error: 'targetKind is survey, board, point or route.' }).optional(),
	targetId: itemId.optional()
});
export type CommentListQuery = z.infer<typeof commentListQuerySchema>;
