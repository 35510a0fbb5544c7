import { z } from 'zod';
import { areaSchema, pageQuerySchema, queryObject } from '$lib/schemas/register';
import { collection } from '$lib/server/register/crud';
import * as register from '$lib/server/db/register';

const query = pageQuerySchema.extend({ siteId: z.uuid().optional().catch(undefined) });

export const { GET, POST } = collection({
	noun: 'area',
	read: 'register.read',
	write: 'register.write',
	list: (db, v, url) => register.listAreas(db, v.organisationId, query.parse(queryObject(url))),
	schema: areaSchema,
	create: (db, v, data) => register.createArea(db, v.organisationId, data)
});
