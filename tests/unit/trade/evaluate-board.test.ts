import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import * as Y from 'yjs';
import { readBoard } from '../../../src/lib/board/model';
import { writeDemoBoard } from '../../../src/lib/server/db/seed-board';
import { evaluateBoard, type BoardContent, type MachineInput } from '../../../src/lib/trade';

// RW-P01 as the demo register has it (src/lib/server/db/seed-register.ts): 1485 r/min, constant
// speed, no speed signal, not in a hazardous area.
const pump: MachineInput = { speedRpm: 1485, speedMode: 'constant', hasSpeedSignal: false, hazardousArea: false };

function demo() {
	const doc = new Y.Doc();
	writeDemoBoard(doc, { createdBy: 'u-tam', supplyPointId: null });
	return readBoard(doc);
}

const byRule = (fs: Array<{ rule: string; severity: string }>) => Object.fromEntries(fs.map((f) => [f.rule, f.severity]));

describe('the demo board', () => {
	test('gives the findings the board has always shown', () => {
		const board = demo();
		const ev = evaluateBoard(board, { machine: pump });
		// Items made in the same millisecond sort by their random ids: find them by what they are.
		const point = (component: RegExp) => board.points.find((p) => component.test(p.component))!;
		const good = point(/^Pump drive-end/);
		const cowl = point(/fan cowl/);
		const pending = point(/^Motor drive-end/);
		const goodRoute = board.routes.find((r) => r.pointId === good.id)!;
		const pendingRoute = board.routes.find((r) => r.pointId === pending.id)!;
		const [coupling] = board.zones;

		// Drive-end housing: every point rule passes (TRADE.md defaults: seat 40 ≥ 30 mm, wall 22 ≥ 15 mm,
		// cast iron needs 9 mm of thread, 20 ≤ 75 mm from the bearing, 45 ≤ 80 °C); its route is
		// fixed, clear of the coupling, and only the supply voltage is still to be measured.
		const g = ev.points.get(good.id)!;
		expect(byRule(g.findings)).toEqual({
			'surface.solid-metal': 'pass',
			'seat.flat-diameter': 'pass',
			'hole.wall-thickness': 'pass',
			'hole.thread-engagement': 'pass',
			'distance.bearing': 'pass',
			'surface.temperature': 'pass',
			'route.drawn': 'pass',
			'route.keep-out': 'pass',
			'route.fixing': 'pass',
			'route.supply-voltage': 'warn',
			'machine.speed': 'pass',
			'machine.speed-signal': 'pass',
			'machine.hazardous-area': 'pass'
		});
		expect(g.worst).toBe('warn');
		expect(g.route?.id).toBe(goodRoute.id);

		// Fan cowl: sheet metal fails, a 2 mm wall cannot take a tapped hole, and there is no route.
		const c = ev.points.get(cowl.id)!;
		expect(c.worst).toBe('fail');
		expect(byRule(c.findings)).toMatchObject({ 'surface.solid-metal': 'fail', 'hole.wall-thickness': 'fail', 'route.drawn': 'warn' });
		expect(c.route).toBeNull();

		// Motor drive end: distance and temperature still to measure; its route runs through the coupling.
		const p = ev.points.get(pending.id)!;
		expect(byRule(p.findings)).toMatchObject({ 'distance.bearing': 'warn', 'surface.temperature': 'warn', 'route.keep-out': 'fail' });
		expect(p.worst).toBe('fail');
		const r = ev.routes.get(pendingRoute.id)!;
		expect(r.geometry).toMatchObject({ lengthSource: 'scale', crossesZoneIds: [coupling.id] });
		// 230·80 px leg (243.5 px) + 300 px at 800 mm per 520 px = 0.836 m.
		expect(r.geometry.lengthM!).toBeCloseTo(((Math.hypot(230, 80) + 300) * 800) / 520 / 1000, 9);
		expect(r.worst).toBe('fail');
		expect(r.findings.every((f) => f.rule.startsWith('route.'))).toBe(true);

		expect(ev.zones.get(coupling.id)).toEqual({ id: coupling.id, crossingRouteIds: [pendingRoute.id] });
		expect(ev.counts).toEqual({ pass: 0, warn: 1, fail: 2 });
	});

	test('plain content (as a server reads it from storage or JSON) gives the same findings as the live snapshot', () => {
		const board = demo();
		const plain = JSON.parse(JSON.stringify(board)) as BoardContent;
		for (const thresholds of [null, { sensorCurrentA: 2 }, { distanceWarnMm: 'far' }]) {
			const a = evaluateBoard(board, { machine: pump, thresholds });
			const b = evaluateBoard(plain, { machine: pump, thresholds });
			expect([...b.points.values()].map(({ route, ...rest }) => ({ ...rest, route: route?.id }))).toEqual(
				[...a.points.values()].map(({ route, ...rest }) => ({ ...rest, route: route?.id }))
			);
			expect([...b.routes.entries()]).toEqual([...a.routes.entries()]);
			expect(b.counts).toEqual(a.counts);
		}
	});
});

describe('findings per item carry the rule and the field', () => {
	const content = (route: Record<string, unknown>, point: Record<string, unknown> = {}): BoardContent => ({
		points: [
			{
				id: 'p1',
				surface: 'machined_housing',
				mounting: 'stud',
				material: 'steel',
				flatDiameterMm: 35,
				wallThicknessMm: 20,
				distanceToBearingMm: 40,
				distanceLine: null,
				surfaceTempC: 50,
				...point
			}
		],
		routes: [
			{
				id: 'r1',
				pointId: 'p1',
				vertices: [
					[0, 0],
					[10, 0]
				],
				lengthEnteredM: 10,
				crossSectionMm2: 0.75,
				supplyV: 24,
				fixings: 'clips',
				...route
			}
		],
		zones: [],
		scale: null
	});

	test('a wrong value on a route field goes to the route, one on a point field stays with the point', () => {
		const ev = evaluateBoard(content({ crossSectionMm2: 2000 }, { flatDiameterMm: 5000 }), { machine: pump });
		const route = ev.routes.get('r1')!;
		expect(route.findings).toContainEqual(
			expect.objectContaining({ rule: 'input.invalid', field: 'route.crossSectionMm2', severity: 'fail' })
		);
		expect(route.findings.some((f) => f.field === 'point.flatDiameterMm')).toBe(false);
		expect(ev.points.get('p1')!.findings).toContainEqual(expect.objectContaining({ rule: 'input.invalid', field: 'point.flatDiameterMm' }));
	});

	test('a value not given yet keeps its field and the missing flag', () => {
		const ev = evaluateBoard(content({ crossSectionMm2: null, lengthEnteredM: null }), { machine: pump });
		const fs = ev.routes.get('r1')!.findings;
		expect(fs).toContainEqual(
			expect.objectContaining({ rule: 'route.supply-voltage', field: 'route.crossSectionMm2', missing: true, severity: 'warn' })
		);
		expect(fs).toContainEqual(expect.objectContaining({ rule: 'route.drawn', field: 'route.lengthM', missing: true, severity: 'warn' }));
	});
});

test('the trade module stays free of Yjs and of I/O', () => {
	const dir = join(__dirname, '../../../src/lib/trade');
	for (const f of readdirSync(dir).filter((x) => x.endsWith('.ts'))) {
		const src = readFileSync(join(dir, f), 'utf8');
		expect(src, f).not.toMatch(/from ['"](yjs|node:|fs|\$app|\$env)/);
	}
});
