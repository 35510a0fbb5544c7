// The demo board's content: raw water pump 1 seen from the drive side, marked up on the
// 1600 × 1000 demo sketch (coordinates are its pixels). A good point, a point on a fan cowl that
// fails, a point still missing a measurement, a keep-out zone round the coupling, and two cable
// routes, one of them through the zone. Pure, so tests can build the same board.
import type * as Y from 'yjs';
import { addPoint, addRoute, addZone, setScale } from '../../board/model/ops';

export interface DemoBoardOptions {
	/** Who placed the points (stored as given). */
	createdBy: string;
	/** The supply point the routes run to, or null for an exit label. */
	supplyPointId: string | null;
}

export function writeDemoBoard(doc: Y.Doc, { createdBy: by, supplyPointId }: DemoBoardOptions): void {
	setScale(doc, { a: [900, 800], b: [1420, 800], lengthMm: 800 }, 'seed');
	const good = addPoint(
		doc,
		{
			x: 610,
			y: 560,
			createdBy: by,
			component: 'Pump drive-end bearing housing',
			direction: 'radial_h',
			surface: 'machined_housing',
			mounting: 'stud',
			material: 'cast_iron',
			flatDiameterMm: 40,
			wallThicknessMm: 22,
			distanceToBearingMm: 20,
			surfaceTempC: 45
		},
		'seed'
	);
	addPoint(
		doc,
		{
			x: 850,
			y: 610,
			createdBy: by,
			component: 'Motor non-drive end (fan cowl)',
			direction: 'radial_v',
			surface: 'sheet_cover',
			mounting: 'stud',
			flatDiameterMm: 35,
			wallThicknessMm: 2,
			notes: 'Only flat spot in reach; the cowl is sheet metal.'
		},
		'seed'
	);
	const pending = addPoint(
		doc,
		{
			x: 960,
			y: 520,
			createdBy: by,
			component: 'Motor drive-end bearing housing',
			direction: 'radial_h',
			surface: 'cast_housing',
			mounting: 'bonded_pad',
			flatDiameterMm: 32
		},
		'seed'
	);
	addZone(
		doc,
		{
			label: 'Coupling',
			kind: 'coupling',
			polygon: [
				[680, 535],
				[780, 535],
				[780, 685],
				[680, 685]
			]
		},
		'seed'
	);
	addRoute(
		doc,
		{
			pointId: good,
			supplyPointId,
			exitLabel: supplyPointId ? '' : 'Junction box JB-1',
			vertices: [
				[610, 560],
				[610, 400],
				[1500, 400],
				[1500, 850]
			],
			lengthEnteredM: 18,
			crossSectionMm2: 0.75,
			fixings: 'clips'
		},
		'seed'
	);
	addRoute(
		doc,
		{
			pointId: pending,
			supplyPointId,
			exitLabel: supplyPointId ? '' : 'Junction box JB-1',
			vertices: [
				[960, 520],
				[730, 600],
				[730, 900]
			],
			crossSectionMm2: 0.75,
			fixings: 'ties'
		},
		'seed'
	);
}
