import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as Y from 'yjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { seedDemo, DEMO_ORG } from '../../src/lib/server/db/seed';
import { DEMO_SURVEY } from '../../src/lib/server/db/seed-survey';
import { diskStorage } from '../../src/lib/server/storage/index';
import { readDocument } from '../../src/lib/server/collab/persistence';
import { polylineCrossesPolygon } from '../../src/lib/trade';

let t: TestDatabase;
beforeAll(async () => {
	t = await createTestDatabase();
});
afterAll(async () => t?.drop());

describe('demo survey', () => {
	it('seeds one site walk with a marked-up board, and seeding again adds nothing', async () => {
		const storage = diskStorage(mkdtempSync(join(tmpdir(), 'spotface-seed-')));
		await seedDemo(t.db, [], { storage });
		await seedDemo(t.db, [], { storage });
		const org = await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirstOrThrow();
		const surveys = await t.db
			.selectFrom('survey')
			.select(['id', 'status'])
			.where('organisation_id', '=', org.id)
			.where('title', '=', DEMO_SURVEY)
			.execute();
		expect(surveys).toHaveLength(1);
		expect(surveys[0].status).toBe('walking');
		const boards = await t.db.selectFrom('board').select(['id', 'media_id']).where('survey_id', '=', surveys[0].id).execute();
		expect(boards).toHaveLength(1);
		expect(boards[0].media_id).not.toBeNull();

		const doc = new Y.Doc();
		Y.applyUpdate(doc, (await readDocument(t.db, boards[0].id))!);
		const points = [...doc.getMap<Y.Map<unknown>>('points').values()].map((m) => m.toJSON());
		expect(points.map((p) => p.surface).sort()).toEqual(['cast_housing', 'machined_housing', 'sheet_cover']);
		const zone = [...doc.getMap<Y.Map<unknown>>('zones').values()][0].toJSON();
		const routes = [...doc.getMap<Y.Map<unknown>>('routes').values()].map((m) => m.toJSON());
		expect(routes).toHaveLength(2);
		// Exactly one of the two demo routes runs through the coupling's keep-out zone.
		expect(routes.filter((r) => polylineCrossesPolygon(r.vertices, zone.polygon))).toHaveLength(1);
	});
});
