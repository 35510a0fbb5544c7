// Survey planning forms: the site, a title, the date, the machines to walk and the people.
import { z } from 'zod';

const uuid = (message: string) => z.uuid({ error: message });

const isoDate = z
	.string()
	.trim()
	.refine(
		(s) => s === '' || (/^\d{4}-\d{2}-\d{2}$/.test(s) && !Number.isNaN(Date.parse(`${s}T00:00:00Z`))),
		'Enter the date as YYYY-MM-DD.'
	)
	.transform((s) => (s === '' ? null : s));

export const surveyPlanSchema = z.object({
	siteId: uuid('Choose the site to survey.'),
	title: z.string().trim().min(2, 'Give the survey a title (at least 2 characters).').max(120, 'A title has at most 120 characters.'),
	plannedDate: isoDate,
	notes: z.string().trim().max(2000, 'Notes have at most 2000 characters.'),
	machineIds: z.array(uuid('A machine could not be read; reload the page.')).max(500),
	engineerId: z
		.string()
		.trim()
		.transform((s) => (s === '' ? null : s)),
	technicianIds: z.array(z.string().min(1)).max(100)
});
export type SurveyPlan = z.infer<typeof surveyPlanSchema>;

/** Reads the plan form (checkbox groups arrive as repeated fields). */
export function readSurveyPlan(form: FormData) {
	const one = (k: string) => {
		const v = form.get(k);
		return typeof v === 'string' ? v : '';
	};
	const many = (k: string) => form.getAll(k).filter((v): v is string => typeof v === 'string' && v !== '');
	const raw = {
		siteId: one('siteId'),
		title: one('title'),
		plannedDate: one('plannedDate'),
		notes: one('notes'),
		machineIds: many('machineId'),
		engineerId: one('engineerId'),
		technicianIds: many('technicianId')
	};
	const parsed = surveyPlanSchema.safeParse(raw);
	const values = { ...raw };
	if (parsed.success) return { ok: true as const, data: parsed.data, values };
	const errors: Record<string, string> = {};
	for (const issue of parsed.error.issues) {
		const key = String(issue.path[0] ?? '_');
		errors[key] ??= issue.message;
	}
	return { ok: false as const, errors, values };
}

export const boardCreateSchema = z.object({
	machineId: uuid('Choose the machine.'),
	mediaId: z
		.string()
		.trim()
		.transform((s) => (s === '' ? null : s))
		.pipe(uuid('Choose a photo or drawing.').nullable()),
	title: z.string().trim().max(120, 'A title has at most 120 characters.').default('')
});
