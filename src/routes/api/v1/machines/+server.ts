import { machineListQuerySchema, machineSchema, queryObject } from '$lib/schemas/register';
import { collection } from '$lib/server/register/crud';
import * as machines from '$lib/server/db/machines';

export const { GET, POST } = collection({
	noun: 'machine',
	read: 'register.read',
	write: 'register.write',
	list: (db, v, url) => machines.listMachines(db, v.organisationId, machineListQuerySchema.parse(queryObject(url))),
	schema: machineSchema,
	create: (db, v, data) => machines.createMachine(db, v.organisationId, data)
});
