// Demo register: an invented water-treatment works with three areas, 24 V DC supply points and
// twelve machines (motors, pumps, fans, a blower, a compressor) with bearings, plus a drawn
// sketch per machine so the board has a picture.
// Idempotent: the site is looked up by name, machines by tag.
import sharp from 'sharp';
import type { DB } from './index';
import type { BearingPosition, Foundation, MachineKind, SpeedMode } from './types';
import type { Storage } from '../storage/index';
import { storeUpload } from '../media/service';
import { DEFAULT_LIMITS } from '../media/process';

export const DEMO_SITE = 'Kestrel Mere Water Treatment Works';

interface DemoBearing {
	position: BearingPosition;
	component: string;
	designation: string;
	n: number;
	d: number;
	D: number;
	angle?: number;
}
interface DemoMachine {
	tag: string;
	name: string;
	kind: MachineKind;
	area: 0 | 1 | 2;
	speed: number;
	mode: SpeedMode;
	signal: boolean;
	kw: number;
	foundation: Foundation | null;
	hazardous?: string;
	notes: string;
	bearings: DemoBearing[];
}

// Deep-groove ball bearing geometry of the 62xx/63xx size series: approximate values recalled
// from memory for demo data only (the 6205 row matches the published CWRU test bearing:
// 9 balls, 7.94 mm, pitch 39.04 mm). Real machines take their values from the nameplate or
// the maker's data sheet.
const B = {
	'6205': { n: 9, d: 7.94, D: 39.04 },
	'6206': { n: 9, d: 9.53, D: 46.5 },
	'6208': { n: 9, d: 12.7, D: 60.0 },
	'6210': { n: 10, d: 12.7, D: 70.0 },
	'6309': { n: 8, d: 17.46, D: 72.5 },
	'6311': { n: 8, d: 20.64, D: 85.0 },
	'6313': { n: 8, d: 23.81, D: 100.0 },
	'6316': { n: 8, d: 28.58, D: 122.5 }
} as const;
const bearing = (position: BearingPosition, component: string, size: keyof typeof B, angle = 0): DemoBearing => ({
	position,
	component,
	designation: `${size} size`,
	...B[size],
	angle
});

const MACHINES: DemoMachine[] = [
	{
		tag: 'RW-M01',
		name: 'Raw water pump 1 motor',
		kind: 'motor',
		area: 0,
		speed: 1485,
		mode: 'constant',
		signal: false,
		kw: 75,
		foundation: 'rigid',
		notes: 'TEFC motor, foot mounted. Fan cowl at the NDE: do not mount on it.',
		bearings: [bearing('drive_end', 'motor', '6316'), bearing('non_drive_end', 'motor', '6313')]
	},
	{
		tag: 'RW-P01',
		name: 'Raw water pump 1',
		kind: 'pump',
		area: 0,
		speed: 1485,
		mode: 'constant',
		signal: false,
		kw: 75,
		foundation: 'rigid',
		notes: 'End-suction pump on a common baseplate with RW-M01.',
		bearings: [bearing('drive_end', 'pump', '6311'), bearing('non_drive_end', 'pump', '6311')]
	},
	{
		tag: 'RW-P02',
		name: 'Raw water pump 2',
		kind: 'pump',
		area: 0,
		speed: 1485,
		mode: 'constant',
		signal: false,
		kw: 75,
		foundation: 'rigid',
		notes: 'Duty/standby with RW-P01.',
		bearings: [bearing('drive_end', 'pump', '6311'), bearing('non_drive_end', 'pump', '6311')]
	},
	{
		tag: 'BW-P01',
		name: 'Backwash pump',
		kind: 'pump',
		area: 0,
		speed: 2950,
		mode: 'variable',
		signal: true,
		kw: 30,
		foundation: 'rigid',
		notes: 'Variable-speed drive; speed signal available from the drive panel.',
		bearings: [bearing('drive_end', 'pump', '6309'), bearing('non_drive_end', 'pump', '6309')]
	},
	{
		tag: 'AB-M01',
		name: 'Aeration blower 1 motor',
		kind: 'motor',
		area: 1,
		speed: 2975,
		mode: 'constant',
		signal: false,
		kw: 132,
		foundation: 'flexible',
		notes: 'On anti-vibration mounts with the blower skid.',
		bearings: [bearing('drive_end', 'motor', '6316'), bearing('non_drive_end', 'motor', '6313')]
	},
	{
		tag: 'AB-01',
		name: 'Aeration blower 1',
		kind: 'blower',
		area: 1,
		speed: 2975,
		mode: 'constant',
		signal: false,
		kw: 132,
		foundation: 'flexible',
		notes: 'Acoustic enclosure: the side panels come off for access.',
		bearings: [bearing('drive_end', 'blower', '6313'), bearing('non_drive_end', 'blower', '6311')]
	},
	{
		tag: 'OC-F01',
		name: 'Odour control extract fan',
		kind: 'fan',
		area: 1,
		speed: 1470,
		mode: 'constant',
		signal: false,
		kw: 11,
		foundation: 'flexible',
		hazardous: 'Zone 2 (gas group IIA, T3) inside the sludge-cake extract duct room',
		notes: 'Belt driven. Belt guard and fan cowl are sheet metal.',
		bearings: [bearing('drive_end', 'fan', '6210'), bearing('non_drive_end', 'fan', '6208')]
	},
	{
		tag: 'ST-P01',
		name: 'Sludge transfer pump',
		kind: 'pump',
		area: 1,
		speed: 240,
		mode: 'variable',
		signal: false,
		kw: 5.5,
		foundation: 'rigid',
		notes: 'Progressive-cavity pump on a gearbox; low speed, no speed signal wired yet.',
		bearings: [bearing('drive_end', 'gearbox output', '6206'), bearing('non_drive_end', 'gearbox input', '6205')]
	},
	{
		tag: 'TW-M01',
		name: 'Treated water pump 1 motor',
		kind: 'motor',
		area: 2,
		speed: 1480,
		mode: 'constant',
		signal: false,
		kw: 45,
		foundation: 'rigid',
		notes: 'TEFC motor on a common baseplate with TW-P01.',
		bearings: [bearing('drive_end', 'motor', '6313'), bearing('non_drive_end', 'motor', '6311')]
	},
	{
		tag: 'TW-P01',
		name: 'Treated water pump 1',
		kind: 'pump',
		area: 2,
		speed: 1480,
		mode: 'constant',
		signal: false,
		kw: 45,
		foundation: 'rigid',
		notes: 'Split-case pump feeding the service reservoir.',
		bearings: [bearing('drive_end', 'pump', '6311'), bearing('non_drive_end', 'pump', '6309')]
	},
	{
		tag: 'IA-M01',
		name: 'Instrument air compressor motor',
		kind: 'motor',
		area: 2,
		speed: 2960,
		mode: 'constant',
		signal: false,
		kw: 22,
		foundation: 'rigid',
		notes: 'Flange-mounted on the compressor frame.',
		bearings: [bearing('drive_end', 'motor', '6309'), bearing('non_drive_end', 'motor', '6208')]
	},
	{
		tag: 'IA-C01',
		name: 'Instrument air compressor',
		kind: 'compressor',
		area: 2,
		speed: 2960,
		mode: 'constant',
		signal: false,
		kw: 22,
		foundation: 'rigid',
		notes: 'Oil-injected screw compressor in a canopy; the receiver stands beside it.',
		bearings: [bearing('drive_end', 'compressor', '6309'), bearing('non_drive_end', 'compressor', '6208')]
	}
];

const AREAS = [
	{ name: 'Raw water pumping station', notes: 'Ground floor, pump hall. Access via the east door.' },
	{ name: 'Aeration blower house', notes: 'Hearing protection needed while the blowers run.' },
	{ name: 'Treated water and compressed air', notes: 'Plant room under the control building; the compressor starts by itself.' }
];

const SUPPLY_POINTS: Array<{ area: 0 | 1 | 2; name: string; tag: string; note: string; maxA: number | null }> = [
	{ area: 0, name: 'Field junction box JB-RW1', tag: 'JB-RW1', note: 'West wall beside RW-P01, 1.4 m above floor', maxA: 2 },
	{ area: 0, name: 'Marshalling cabinet MC-RW', tag: 'MC-RW', note: 'Control room end of the pump hall', maxA: 4 },
	{ area: 1, name: 'Field junction box JB-AB1', tag: 'JB-AB1', note: 'On the cable tray upright north of AB-01', maxA: 2 },
	{ area: 1, name: 'Distribution board DB-AB 24 V section', tag: 'DB-AB-24', note: 'Electrical room; qualified person only', maxA: null },
	{ area: 2, name: 'Field junction box JB-TW1', tag: 'JB-TW1', note: 'Column C3 between TW-P01 and the compressor', maxA: 2 }
];

export async function seedRegister(db: DB, organisationId: string, opts: { storage?: Storage } = {}) {
	let site = await db
		.selectFrom('site')
		.select('id')
		.where('organisation_id', '=', organisationId)
		.where('name', '=', DEMO_SITE)
		.executeTakeFirst();
	if (!site) {
		site = await db
			.insertInto('site')
			.values({
				organisation_id: organisationId,
				name: DEMO_SITE,
				code: 'KMW',
				address: 'Mere Lane, Kestrel Mere (invented demo site)',
				notes: 'Demo data: an invented works.'
			})
			.returning('id')
			.executeTakeFirstOrThrow();
	}
	const areaIds: string[] = [];
	for (const a of AREAS) {
		let row = await db
			.selectFrom('area')
			.select('id')
			.where('organisation_id', '=', organisationId)
			.where('site_id', '=', site.id)
			.where('name', '=', a.name)
			.executeTakeFirst();
		if (!row)
			row = await db
				.insertInto('area')
				.values({ organisation_id: organisationId, site_id: site.id, name: a.name, notes: a.notes })
				.returning('id')
				.executeTakeFirstOrThrow();
		areaIds.push(row.id);
	}
	for (const s of SUPPLY_POINTS) {
		const exists = await db
			.selectFrom('supply_point')
			.select('id')
			.where('organisation_id', '=', organisationId)
			.where('tag', '=', s.tag)
			.executeTakeFirst();
		if (!exists) {
			await db
				.insertInto('supply_point')
				.values({
					organisation_id: organisationId,
					area_id: areaIds[s.area]!,
					name: s.name,
					tag: s.tag,
					voltage_v: 24,
					max_current_a: s.maxA,
					location_note: s.note
				})
				.execute();
		}
	}
	for (const m of MACHINES) {
		let row = await db
			.selectFrom('machine')
			.select('id')
			.where('organisation_id', '=', organisationId)
			.where('tag', '=', m.tag)
			.executeTakeFirst();
		if (!row) {
			row = await db
				.insertInto('machine')
				.values({
					organisation_id: organisationId,
					site_id: site.id,
					area_id: areaIds[m.area]!,
					name: m.name,
					tag: m.tag,
					kind: m.kind,
					speed_rpm: m.speed,
					speed_mode: m.mode,
					speed_signal: m.signal,
					power_kw: m.kw,
					foundation: m.foundation,
					hazardous_area: !!m.hazardous,
					hazardous_zone_note: m.hazardous ?? '',
					notes: m.notes
				})
				.returning('id')
				.executeTakeFirstOrThrow();
			for (const b of m.bearings) {
				await db
					.insertInto('bearing')
					.values({
						organisation_id: organisationId,
						machine_id: row.id,
						position: b.position,
						component: b.component,
						designation: b.designation,
						rolling_elements: b.n,
						rolling_element_d_mm: b.d,
						pitch_d_mm: b.D,
						contact_angle_deg: b.angle ?? 0
					})
					.execute();
			}
		}
		if (opts.storage) {
			const has = await db
				.selectFrom('media')
				.select('id')
				.where('organisation_id', '=', organisationId)
				.where('machine_id', '=', row.id)
				.executeTakeFirst();
			if (!has) {
				await storeUpload(db, opts.storage, DEFAULT_LIMITS, {
					organisationId,
					machineId: row.id,
					userId: null,
					kind: 'photo',
					caption: 'Demo sketch (drawn, not a real photo)',
					filename: `${m.tag.toLowerCase()}-sketch.png`,
					bytes: await sketch(m)
				});
			}
		}
	}
	return site.id;
}

/** A simple side view of the machine, drawn from an SVG string. */
export async function sketch(m: { kind: MachineKind; tag: string; name: string }): Promise<Buffer> {
	const W = 1600;
	const H = 1000;
	const steel = '#6b7f93';
	const dark = '#33475b';
	const parts: string[] = [];
	const motor = (x: number, y: number, w: number, h: number) =>
		parts.push(
			`<rect x="${x}" y="${y}" width="${w}" height="${h}" rx="24" fill="${steel}" stroke="${dark}" stroke-width="6"/>`,
			...Array.from(
				{ length: 9 },
				(_, i) =>
					`<line x1="${x + 40 + i * ((w - 80) / 8)}" y1="${y + 12}" x2="${x + 40 + i * ((w - 80) / 8)}" y2="${y + h - 12}" stroke="${dark}" stroke-width="4" opacity="0.5"/>`
			),
			`<rect x="${x - 90}" y="${y + 30}" width="90" height="${h - 60}" rx="12" fill="#8597a8" stroke="${dark}" stroke-width="5"/>`,
			`<rect x="${x + w * 0.35}" y="${y - 70}" width="${w * 0.3}" height="70" fill="#8597a8" stroke="${dark}" stroke-width="5"/>`,
			`<rect x="${x + 30}" y="${y + h}" width="60" height="60" fill="${dark}"/><rect x="${x + w - 90}" y="${y + h}" width="60" height="60" fill="${dark}"/>`
		);
	const shaft = (x1: number, x2: number, y: number) =>
		parts.push(`<rect x="${x1}" y="${y - 18}" width="${x2 - x1}" height="36" fill="#a9b4bf" stroke="${dark}" stroke-width="4"/>`);
	const coupling = (x: number, y: number) =>
		parts.push(`<rect x="${x - 40}" y="${y - 60}" width="80" height="120" rx="10" fill="#c9a227" stroke="${dark}" stroke-width="5"/>`);
	const housing = (x: number, y: number) =>
		parts.push(`<rect x="${x - 55}" y="${y - 85}" width="110" height="170" rx="14" fill="#7d8f7a" stroke="${dark}" stroke-width="5"/>`);
	const ground = 860;
	parts.push(`<rect x="60" y="${ground}" width="${W - 120}" height="40" fill="#9aa3ab"/>`);
	if (m.kind === 'motor') {
		motor(520, 440, 720, 360);
		shaft(300, 430, 620);
		housing(470, 620);
	} else if (m.kind === 'pump') {
		motor(900, 460, 520, 300);
		shaft(560, 810, 610);
		coupling(730, 610);
		housing(610, 610);
		parts.push(
			`<circle cx="380" cy="600" r="190" fill="${steel}" stroke="${dark}" stroke-width="6"/>`,
			`<rect x="330" y="330" width="100" height="120" fill="${steel}" stroke="${dark}" stroke-width="6"/>`,
			`<rect x="150" y="560" width="80" height="80" fill="${steel}" stroke="${dark}" stroke-width="6"/>`
		);
	} else if (m.kind === 'fan' || m.kind === 'blower') {
		motor(1000, 500, 440, 260);
		parts.push(
			`<circle cx="460" cy="540" r="280" fill="${steel}" stroke="${dark}" stroke-width="6"/>`,
			`<rect x="180" y="200" width="280" height="120" fill="${steel}" stroke="${dark}" stroke-width="6"/>`
		);
		if (m.kind === 'fan')
			parts.push(
				`<path d="M 760 450 L 1000 450 L 1000 770 L 760 770 Z" fill="none" stroke="${dark}" stroke-width="5" stroke-dasharray="20 12"/>`
			);
		shaft(740, 910, 630);
		coupling(900, 630);
		housing(790, 630);
	} else if (m.kind === 'compressor') {
		motor(900, 480, 520, 300);
		shaft(640, 810, 630);
		coupling(730, 630);
		parts.push(
			`<rect x="200" y="400" width="420" height="420" rx="30" fill="#7d8f7a" stroke="${dark}" stroke-width="6"/>`,
			`<rect x="260" y="300" width="160" height="100" fill="${steel}" stroke="${dark}" stroke-width="5"/>`,
			`<rect x="1460" y="260" width="110" height="600" rx="55" fill="#a9b4bf" stroke="${dark}" stroke-width="5"/>`
		);
	} else {
		motor(820, 480, 560, 300);
		parts.push(`<rect x="200" y="430" width="440" height="380" rx="20" fill="#7d8f7a" stroke="${dark}" stroke-width="6"/>`);
		shaft(640, 770, 630);
		coupling(720, 630);
	}
	const esc = (s: string) => s.replace(/[<>&"]/g, (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '"': '&quot;' })[c]!);
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}">
		<rect width="${W}" height="${H}" fill="#eef1f4"/>
		${parts.join('\n')}
		<text x="60" y="90" font-family="DejaVu Sans, sans-serif" font-size="54" font-weight="bold" fill="${dark}">${esc(m.tag)}</text>
		<text x="60" y="150" font-family="DejaVu Sans, sans-serif" font-size="38" fill="${dark}">${esc(m.name)} (demo sketch)</text>
	</svg>`;
	return sharp(Buffer.from(svg)).png().toBuffer();
}
