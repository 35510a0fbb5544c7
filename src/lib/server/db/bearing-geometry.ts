// Read-only view for the calculators: the organisation's live machines that have at least one
// live bearing with its full geometry, with those bearings.
import type { DB } from './index';

export interface GeometryBearing {
	id: string;
	position: string;
	component: string;
	designation: string;
	balls: number;
	ballDiameterMm: number;
	pitchDiameterMm: number;
	contactAngleDeg: number;
}

export interface MachineWithGeometry {
	id: string;
	name: string;
	tag: string | null;
	siteName: string;
	speedRpm: number | null;
	speedMode: string;
	bearings: GeometryBearing[];
}

export async function listMachinesWithBearingGeometry(db: DB, organisationId: string, limit = 500): Promise<MachineWithGeometry[]> {
	const rows = await db
		.selectFrom('bearing')
		.innerJoin('machine', (j) =>
			j.onRef('machine.id', '=', 'bearing.machine_id').onRef('machine.organisation_id', '=', 'bearing.organisation_id')
		)
		.innerJoin('site', 'site.id', 'machine.site_id')
		.where('bearing.organisation_id', '=', organisationId)
		.where('bearing.archived_at', 'is', null)
		.where('machine.archived_at', 'is', null)
		.where('bearing.rolling_elements', 'is not', null)
		.where('bearing.rolling_element_d_mm', 'is not', null)
		.where('bearing.pitch_d_mm', 'is not', null)
		.select([
			'machine.id as machine_id',
			'machine.name as machine_name',
			'machine.tag as machine_tag',
			'machine.speed_rpm',
			'machine.speed_mode',
			'site.name as site_name',
			'bearing.id',
			'bearing.position',
			'bearing.component',
			'bearing.designation',
			'bearing.rolling_elements',
			'bearing.rolling_element_d_mm',
			'bearing.pitch_d_mm',
			'bearing.contact_angle_deg'
		])
		.orderBy('site.name')
		.orderBy('machine.name')
		.orderBy('machine.id')
		.orderBy('bearing.position')
		.orderBy('bearing.component')
		.orderBy('bearing.id')
		.limit(limit * 4)
		.execute();
	const machines = new Map<string, MachineWithGeometry>();
	for (const r of rows) {
		let m = machines.get(r.machine_id);
		if (!m) {
			if (machines.size >= limit) break;
			m = {
				id: r.machine_id,
				name: r.machine_name,
				tag: r.machine_tag,
				siteName: r.site_name,
				speedRpm: r.speed_rpm === null ? null : Number(r.speed_rpm),
				speedMode: r.speed_mode,
				bearings: []
			};
			machines.set(r.machine_id, m);
		}
		m.bearings.push({
			id: r.id,
			position: r.position,
			component: r.component,
			designation: r.designation,
			balls: Number(r.rolling_elements),
			ballDiameterMm: Number(r.rolling_element_d_mm),
			pitchDiameterMm: Number(r.pitch_d_mm),
			contactAngleDeg: Number(r.contact_angle_deg ?? 0)
		});
	}
	return [...machines.values()];
}
