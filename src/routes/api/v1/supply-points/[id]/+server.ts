import { supplyPointUpdateSchema } from '$lib/schemas/register';
import { item } from '$lib/server/register/crud';
import * as register from '$lib/server/db/register';

export const { GET, PATCH, DELETE } = item({
	noun: 'supply_point',
	read: 'register.read',
	write: 'register.write',
	get: register.getSupplyPoint,
	schema: supplyPointUpdateSchema,
	update: register.updateSupplyPoint,
	archive: register.archiveSupplyPoint
});
