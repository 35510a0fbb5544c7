// A job pack input as the jobs module would build it, for the renderer's tests and for
// the benchmark (bench/job-pack.ts).
import sharp from 'sharp';
import type { JobPackInput, JobPackPoint, PaperSize } from '../../src/lib/server/jobs/pack/types';
import { DEFAULT_THRESHOLDS, planJob, SAFETY_CAUTIONS, type JobPlanPoint } from '../../src/lib/trade';

/** A small photo-like PNG (a grey housing on a blue-grey background) made here, not read from disk. */
export async function boardPng(width = 640, height = 420, format: 'png' | 'jpeg' = 'png'): Promise<Uint8Array> {
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">
		<rect width="100%" height="100%" fill="#8fa3b5"/>
		<rect x="${width * 0.15}" y="${height * 0.25}" width="${width * 0.5}" height="${height * 0.5}" rx="18" fill="#5b6570"/>
		<circle cx="${width * 0.78}" cy="${height * 0.5}" r="${height * 0.18}" fill="#3d444b"/>
	</svg>`;
	const img = sharp(Buffer.from(svg));
	return new Uint8Array(await (format === 'png' ? img.png() : img.jpeg()).toBuffer());
}

const MOUNTS: Array<Pick<JobPlanPoint, 'mounting' | 'material'>> = [
	{ mounting: 'stud', material: 'aluminium' },
	{ mounting: 'bonded_pad', material: 'cast_iron' },
	{ mounting: 'magnet', material: 'steel' }
];

/** `count` points cycling stud, bonded pad, magnet, with routes, findings and checklists from the trade module. */
export async function packInput(
	opts: { paper?: PaperSize; count?: number; photo?: boolean; photoFormat?: 'png' | 'jpeg' } = {}
): Promise<JobPackInput> {
	const count = opts.count ?? 3;
	const width = 640;
	const height = 420;
	const plan: JobPlanPoint[] = Array.from({ length: count }, (_, i) => ({
		label: `P${i + 1} ${['DE radial H', 'NDE radial V', 'DE axial'][i % 3]}`,
		...MOUNTS[i % 3],
		cableLengthM: 6 + i * 1.5,
		crossSectionMm2: i % 2 ? 0.5 : 0.75,
		hazardousArea: false
	}));
	const result = planJob(plan, { thresholds: DEFAULT_THRESHOLDS });
	const points: JobPackPoint[] = plan.map((p, i) => ({
		number: i + 1,
		label: p.label!,
		machine: 'Raw water pump 2',
		component: i % 2 ? 'Motor NDE bearing' : 'Pump DE bearing',
		direction: ['radial H', 'radial V', 'axial'][i % 3],
		material: p.material ?? null,
		preparation: result.points[i].preparation,
		torqueLimitNm: result.points[i].torqueLimitNm,
		cableLengthM: p.cableLengthM ?? null,
		conductor: result.points[i].conductor,
		supplyPoint: 'MCC-2 24 V DC terminal X4',
		notes: i === 0 ? 'Seat on the machined pad left of the grease nipple.' : '',
		findings:
			i % 3 === 2
				? [
						{ severity: 'warn', rule: 'mounting.magnet-temporary', message: 'Magnet mounts are for temporary surveys.' },
						{ severity: 'pass', rule: 'seat.flat-diameter', message: '40 mm of flat seat (at least 30 mm needed).' }
					]
				: [{ severity: 'pass', rule: 'seat.flat-diameter', message: '40 mm of flat seat (at least 30 mm needed).' }],
		checklist: result.points[i].checklist
	}));
	const at = (i: number): [number, number] => [60 + ((i * 97) % (width - 120)), 70 + ((i * 61) % (height - 140))];
	return {
		paper: opts.paper ?? 'A4',
		organisation: 'Harrowgate Water Services',
		job: {
			reference: 'J-0007',
			title: 'Raw water pump 2: sensors on pump and motor bearings',
			survey: 'Moorside treatment works, pump hall walk',
			site: 'Moorside treatment works',
			revision: 2,
			status: 'assigned',
			assignee: 'Tomas Reed',
			outageStart: '2026-12-08T07:00:00Z',
			outageEnd: '2026-12-08T12:00:00Z',
			due: '2026-12-09',
			lockoutRequired: result.lockout.required,
			generatedAt: '2026-12-02T15:00:00Z'
		},
		boards: [
			{
				title: 'Pump and motor, drive side',
				image:
					opts.photo === false
						? null
						: opts.photoFormat === 'jpeg'
							? { bytes: await boardPng(width, height, 'jpeg'), mime: 'image/jpeg', width, height }
							: { bytes: await boardPng(width, height), mime: 'image/png', width, height },
				width,
				height,
				points: points.map((p, i) => ({
					number: p.number,
					x: at(i)[0],
					y: at(i)[1],
					worst: p.findings.some((f) => f.severity === 'warn') ? 'warn' : 'pass'
				})),
				routes: points.map((p, i) => ({ pointNumber: p.number, vertices: [at(i), [at(i)[0], height - 20], [width - 20, height - 20]] })),
				zones: [
					{
						label: 'Coupling',
						kind: 'keep_out',
						polygon: [
							[width * 0.62, height * 0.3],
							[width * 0.72, height * 0.3],
							[width * 0.72, height * 0.7],
							[width * 0.62, height * 0.7]
						]
					}
				]
			}
		],
		points,
		tools: result.tools,
		materials: result.materials,
		cableMargin: result.cableMargin,
		cautions: SAFETY_CAUTIONS
	};
}
