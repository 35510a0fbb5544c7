// Ids that arrive in a form, a JSON body or a query string (path ids are matched by
// src/params/uuid.ts). PostgreSQL refuses a malformed uuid with an error, so a garbage id must be
// stopped here with a 400 and a message, not reach a query and become a 500.
import { z } from 'zod';

export const UUID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const isUuid = (v: unknown): v is string => typeof v === 'string' && UUID_PATTERN.test(v);

/** A required id; anything but a uuid is refused with the message. */
export const idField = (message: string) => z.string({ error: message }).trim().regex(UUID_PATTERN, message);

/** A form whose hidden `id` names the row to act on (archive, revoke, remove, change role). */
export const rowRefSchema = (message: string) => z.object({ id: idField(message) });

/** An optional id from a select or hidden field: blank means none. */
export const optionalIdField = (message: string) =>
	z.preprocess((v) => (v == null || (typeof v === 'string' && v.trim() === '') ? null : v), idField(message).nullable());
