// The board policy as the provider's ChangeCheck: the person's role and the board's state in,
// the reason a change may not be made out (null when it may). Each document checked against
// gets a shadow copy kept in step with it, so a check does not copy the whole board.
import * as Y from 'yjs';
import { checkBoardChange, cloneDoc, type BoardActor, type BoardPolicyContext } from '../model/policy';
import type { ChangeCheck } from './set-aside';

/** The reasons of a refusal, in one message (the first few; one change rarely needs more). */
export function refusalMessage(reasons: string[]): string {
	const unique = [...new Set(reasons)];
	return unique.slice(0, 3).join(' ') + (unique.length > 3 ? ` (and ${unique.length - 3} more)` : '');
}

export function policyCheck(actor: BoardActor, context: () => BoardPolicyContext): ChangeCheck {
	const shadows = new WeakMap<Y.Doc, Y.Doc>();
	const shadowOf = (doc: Y.Doc) => {
		let shadow = shadows.get(doc);
		if (!shadow) {
			const fresh = cloneDoc(doc);
			// Kept in step with every change the document takes (applying a change twice is harmless).
			const follow = (u: Uint8Array) => {
				if (shadows.get(doc) === fresh) Y.applyUpdate(fresh, u);
			};
			doc.on('update', follow);
			fresh.on('destroy', () => doc.off('update', follow));
			doc.on('destroy', () => fresh.destroy());
			shadows.set(doc, fresh);
			shadow = fresh;
		}
		return shadow;
	};
	return (doc, update) => {
		const shadow = shadowOf(doc);
		const r = checkBoardChange(doc, update, actor, context(), { shadow });
		if (r.ok) return null;
		// The shadow now holds the refused change: start it afresh next time.
		shadows.delete(doc);
		shadow.destroy();
		return refusalMessage(r.refusals.map((x) => x.reason));
	};
}
