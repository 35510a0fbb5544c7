import { z } from 'zod';
import { supplyPointSchema, pageQuerySchema, queryObject } from '$lib/schemas/register';
import { collection } from '$lib/server/register/crud';
import * as register from '$lib/server/db/register';

const query = pageQuerySchema.extend({ siteId: z.uuid().optional().catch(undefined), areaId: z.uuid().optional().catch(undefined) });

export const { GET, POST } = collection({
	noun: 'supply_point',
	read: 'register.read',
	write: 'register.write',
	list: (db, v, url) => register.listSupplyPoints(db, v.organisationId, query.parse(queryObject(url))),
	schema: supplyPointSchema,
	create: (db, v, data) => register.createSupplyPoint(db, v.organisationId, data)
});
