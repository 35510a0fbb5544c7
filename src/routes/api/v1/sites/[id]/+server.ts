import { siteUpdateSchema } from '$lib/schemas/register';
import { item } from '$lib/server/register/crud';
import * as register from '$lib/server/db/register';

export const { GET, PATCH, DELETE } = item({
	noun: 'site',
	read: 'register.read',
	write: 'register.write',
	get: register.getSite,
	schema: siteUpdateSchema,
	update: register.updateSite,
	archive: register.archiveSite
});
