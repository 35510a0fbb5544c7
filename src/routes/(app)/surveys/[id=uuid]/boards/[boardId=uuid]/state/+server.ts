// The board's stored state (snapshot and log, as stored) for the board page to draw from
// before the live sync has joined; the sync then exchanges only the difference. The same
// checks as the page: signed in, a role that reads boards, the board of this survey in the
// member's organisation (anything else is 404).
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { readStored } from '$lib/server/db/board-document';
import { problem } from '$lib/server/http/problem';
import { encodeStoredState, STORED_STATE_TYPE } from '$lib/board/sync/stored-state';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals, params }) => {
	const viewer = requireApi(locals, 'board.read');
	if (viewer instanceof Response) return viewer;
	const stored = await readStored(context().handle.db, params.boardId, { organisationId: viewer.organisationId, surveyId: params.id });
	if (!stored) return problem(404, 'No such board in your organisation.');
	const updates = [...(stored.snapshot ? [stored.snapshot] : []), ...stored.rows.map((r) => r.update)];
	// lib0 encodes into a fresh ArrayBuffer.
	return new Response(encodeStoredState(updates) as Uint8Array<ArrayBuffer>, {
		headers: {
			'content-type': STORED_STATE_TYPE,
			// Private and always current: the live sync corrects it, but nothing keeps a copy.
			'cache-control': 'private, no-store'
		}
	});
};
