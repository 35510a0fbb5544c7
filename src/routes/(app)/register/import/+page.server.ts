import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import { optionalIdField } from '$lib/schemas/ids';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as register from '$lib/server/db/register';
import { record } from '$lib/server/db/audit';
import { CSV_COLUMNS, decode, importMachineCsv, ImportRefused, MAX_CSV_BYTES, validateMachineCsv } from '$lib/server/register/csv';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'register.write', url);
	const sites = await register.listSites(context().handle.db, viewer.organisationId, { perPage: 500 });
	return { sites: sites.items.map((s) => ({ id: s.id, name: s.name })), columns: CSV_COLUMNS };
};

const siteField = z.object({ siteId: optionalIdField('Choose the site from the list (reload the page if it is empty).') });

export const actions: Actions = {
	preview: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const data = await request.formData();
		const file = data.get('file');
		const site = siteField.safeParse({ siteId: data.get('siteId') });
		if (!site.success) return fail(400, { step: 'preview' as const, siteId: null, error: site.error.issues[0]!.message });
		const siteId = site.data.siteId;
		if (!(file instanceof File) || file.size === 0) {
			return fail(400, {
				step: 'preview' as const,
				siteId,
				error:
					file instanceof File && file.name
						? 'The file is empty. Export the machine list as CSV with a header row and one machine per row.'
						: 'Choose a CSV file.'
			});
		}
		if (file.size > MAX_CSV_BYTES)
			return fail(413, {
				step: 'preview' as const,
				siteId,
				error: `The file is larger than ${MAX_CSV_BYTES / 1024 / 1024} MB. Split it into smaller files.`
			});
		const text = decode(new Uint8Array(await file.arrayBuffer()));
		const { report } = await validateMachineCsv(context().handle.db, viewer.organisationId, text, { defaultSiteId: siteId });
		return { step: 'preview' as const, siteId, fileName: file.name, text, report };
	},
	import: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const data = await request.formData();
		const text = String(data.get('text') ?? '');
		const site = siteField.safeParse({ siteId: data.get('siteId') });
		if (!site.success) return fail(400, { step: 'preview' as const, siteId: null, error: site.error.issues[0]!.message });
		const siteId = site.data.siteId;
		const mode = data.get('mode') === 'valid' ? 'valid' : 'all';
		const db = context().handle.db;
		try {
			const r = await importMachineCsv(db, viewer.organisationId, text, { defaultSiteId: siteId, mode });
			await record(db, {
				organisationId: viewer.organisationId,
				actorUserId: viewer.userId,
				action: 'machine.imported',
				data: { imported: r.imported, skipped: r.skipped }
			});
			return { step: 'done' as const, imported: r.imported, skipped: r.skipped, siteId };
		} catch (e) {
			if (e instanceof ImportRefused)
				return fail(422, {
					step: 'preview' as const,
					siteId,
					text,
					report: e.report,
					fileName: String(data.get('fileName') ?? ''),
					error: e.message
				});
			throw e;
		}
	}
};
