import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { seedDemo, DEMO_ORG } from '../../src/lib/server/db/seed';
import { DEMO_SITE } from '../../src/lib/server/db/seed-register';
import { diskStorage } from '../../src/lib/server/storage/index';
import { bearingFrequencies } from '../../src/lib/trade/bearing';
import { bearingSchema } from '../../src/lib/schemas/register';

let t: TestDatabase;
beforeAll(async () => {
	t = await createTestDatabase();
});
afterAll(async () => t?.drop());

describe('demo register', () => {
	it('seeds an invented works with areas, 24 V supply points, a dozen machines of five kinds, bearings and a sketch each; twice changes nothing', async () => {
		const storage = diskStorage(mkdtempSync(join(tmpdir(), 'spotface-seed-')));
		await seedDemo(t.db, [], { storage });
		await seedDemo(t.db, [], { storage });
		const org = await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirstOrThrow();
		const count = async (table: 'site' | 'area' | 'supply_point' | 'machine' | 'bearing' | 'media') =>
			Number(
				(
					await t.db
						.selectFrom(table)
						.select((eb) => eb.fn.countAll<string>().as('n'))
						.where('organisation_id', '=', org.id)
						.executeTakeFirstOrThrow()
				).n
			);
		expect(await count('site')).toBe(1);
		expect(await count('area')).toBe(3);
		expect(await count('supply_point')).toBe(5);
		expect(await count('machine')).toBe(12);
		expect(await count('bearing')).toBe(24);
		// A sketch per machine, and a drawn "as installed" picture per point of the closed survey's job.
		expect(await count('media')).toBe(12 + 2);
		const site = await t.db.selectFrom('site').select('name').where('organisation_id', '=', org.id).executeTakeFirstOrThrow();
		expect(site.name).toBe(DEMO_SITE);
		const kinds = (await t.db.selectFrom('machine').select('kind').where('organisation_id', '=', org.id).execute()).map((m) => m.kind);
		expect(new Set(kinds)).toEqual(new Set(['motor', 'pump', 'blower', 'fan', 'compressor']));
		expect(await t.db.selectFrom('machine').select('hazardous_zone_note').where('hazardous_area', '=', true).execute()).toHaveLength(1);
		const media = await t.db
			.selectFrom('media')
			.selectAll()
			.where('organisation_id', '=', org.id)
			.orderBy('created_at')
			.executeTakeFirstOrThrow();
		const thumb = await storage.get(media.thumb_key);
		expect((await sharp(thumb!).metadata()).format).toBe('webp');
	});

	it('every demo bearing passes the register schema, and the 6205-size row gives the published defect frequencies', async () => {
		const rows = await t.db.selectFrom('bearing').selectAll().execute();
		for (const b of rows) {
			const r = bearingSchema.safeParse({
				position: b.position,
				component: b.component,
				designation: b.designation,
				rollingElements: b.rolling_elements,
				rollingElementDMm: b.rolling_element_d_mm,
				pitchDMm: b.pitch_d_mm,
				contactAngleDeg: b.contact_angle_deg
			});
			expect(r.success, b.designation).toBe(true);
		}
		const b6205 = rows.find((b) => b.designation === '6205 size')!;
		const f = bearingFrequencies(
			{ balls: b6205.rolling_elements!, ballDiameter: b6205.rolling_element_d_mm!, pitchDiameter: b6205.pitch_d_mm! },
			1
		);
		// Case Western Reserve University Bearing Data Center, drive-end bearing 6205 (TRADE.md):
		// BPFO 3.5848, BPFI 5.4152 × shaft speed.
		expect(f.bpfo).toBeCloseTo(3.5848, 2);
		expect(f.bpfi).toBeCloseTo(5.4152, 2);
	});
});
