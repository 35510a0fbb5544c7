import { siteSchema, pageQuerySchema, queryObject } from '$lib/schemas/register';
import { collection } from '$lib/server/register/crud';
import * as register from '$lib/server/db/register';

export const { GET, POST } = collection({
	noun: 'site',
	read: 'register.read',
	write: 'register.write',
	list: (db, v, url) => register.listSites(db, v.organisationId, pageQuerySchema.parse(queryObject(url))),
	schema: siteSchema,
	create: (db, v, data) => register.createSite(db, v.organisationId, data)
});
