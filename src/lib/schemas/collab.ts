// Messages of the live board socket (see src/lib/board/sync/protocol.ts). Binary y-protocols
// messages are checked for type and size here and decoded by the collab server, which closes
// the socket on anything it cannot decode.
import { z } from 'zod';

export const joinRequestSchema = z.object({ boardId: z.uuid() }).strict();
export type JoinRequest = z.infer<typeof joinRequestSchema>;

export function binaryMessageSchema(maxBytes: number) {
	return z
		.custom<Uint8Array>((v) => v instanceof Uint8Array, { message: 'expected a binary message' })
		.refine((v) => v.byteLength > 0, { message: 'empty message' })
		.refine((v) => v.byteLength <= maxBytes, { message: `message larger than ${maxBytes} bytes` });
}

/**
 * One client's presence on a board, as the board UI sets it: who (the server overwrites the
 * name and id with the signed-in member's), where the pointer is, what is selected. Unknown
 * fields pass through so a newer client can add some; the size is capped by the server.
 */
export const awarenessStateSchema = z.looseObject({
	user: z
		.looseObject({
			name: z.string().max(200).optional(),
			color: z.string().max(64).optional()
		})
		.optional(),
	cursor: z.looseObject({ x: z.number(), y: z.number() }).nullable().optional(),
	selection: z.array(z.string().max(200)).max(1000).nullable().optional()
});
export type AwarenessState = z.infer<typeof awarenessStateSchema>;
