import { areaUpdateSchema } from '$lib/schemas/register';
import { item } from '$lib/server/register/crud';
import * as register from '$lib/server/db/register';

export const { GET, PATCH, DELETE } = item({
	noun: 'area',
	read: 'register.read',
	write: 'register.write',
	get: register.getArea,
	schema: areaUpdateSchema,
	update: register.updateArea,
	archive: register.archiveArea
});
