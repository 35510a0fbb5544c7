// Review and approval: moving a survey (submit, request changes, approve, reopen, ...) and
// choosing two revisions to compare.
import { z } from 'zod';
import { TRANSITION_NAMES, TRANSITION_NOTE_MAX } from '../survey/states';

export const transitionSchema = z
	.object({
		transition: z.enum(TRANSITION_NAMES, { error: `transition is one of ${TRANSITION_NAMES.join(', ')}.` }),
		note: z.string().trim().max(TRANSITION_NOTE_MAX, `A note has at most ${TRANSITION_NOTE_MAX} characters.`).default(''),
		/** Approving with rejected or undecided points: set after the person confirmed them. */
		confirmExceptions: z.boolean().default(false)
	})
	.strict();
export type TransitionRequest = z.infer<typeof transitionSchema>;

const revisionNumber = z.coerce
	.number({ error: 'A revision number.' })
	.int('A revision number.')
	.min(1, 'Revisions start at 1.')
	.max(1_000_000);

export const compareQuerySchema = z.object({ from: revisionNumber, to: revisionNumber });
export const revisionNumberSchema = revisionNumber;
