import { bearingUpdateSchema } from '$lib/schemas/register';
import { item } from '$lib/server/register/crud';
import * as machines from '$lib/server/db/machines';

// Bearing geometry is read off nameplates and drawings on the walk: technicians may edit it.
export const { GET, PATCH, DELETE } = item({
	noun: 'bearing',
	read: 'register.read',
	write: 'register.field-edit',
	get: machines.getBearing,
	schema: bearingUpdateSchema,
	update: machines.updateBearing,
	archive: machines.archiveBearing
});
