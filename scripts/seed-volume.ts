// `npm run seed:volume`: 100,000 invented jobs with their customers, units and readings in a shop
// of their own, for benchmarks. Written in SQL so it takes seconds, not minutes.
import fs from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { hashPassword } from '../src/lib/server/auth/password';
import { closeDb, db } from '../src/lib/server/db/index';
import { Shop, User } from '../src/lib/server/db/models';
import { BOARD_COLUMNS_SQL } from '../src/lib/server/jobs';
import { seedStarterSheets } from '../src/lib/server/specs';

export const VOLUME_SHOP = 'Northfield Volume Repair (benchmark data)';
const dataDir = process.env.MENDWISE_DATA_DIR ?? path.resolve(import.meta.dirname, '..', '.data');
const JOBS = Number(process.env.VOLUME_JOBS ?? 100_000);

async function main() {
	db();
	const existing = await Shop.findOne({ where: { name: VOLUME_SHOP } });
	if (existing) {
		const [row] = await db().query<{ n: number }>('SELECT count(*)::int AS n FROM jobs WHERE shop_id = :id', { replacements: { id: existing.id }, type: QueryTypes.SELECT });
		console.log(`[mendwise] the volume shop is already loaded (${row.n} jobs)`);
		return;
	}
	const started = Date.now();
	const password = randomBytes(9).toString('base64url');
	const passwordHash = await hashPassword(password);
	const shop = await Shop.create({ name: VOLUME_SHOP });
	const staff = await User.bulkCreate(
		[
			{ shopId: shop.id, email: 'owner@northfield-volume.example', name: 'Hale Northfield', role: 'owner', passwordHash },
			...Array.from({ length: 6 }, (_, i) => ({
				shopId: shop.id, email: `tech${i + 1}@northfield-volume.example`, name: `Bench Tech ${i + 1}`, role: 'technician' as const, passwordHash
			}))
		],
		{ returning: true }
	);
	await seedStarterSheets(shop.id);
	const techIds = staff.filter((u) => u.role === 'technician').map((u) => u.id);
	const customers = Math.ceil(JOBS * 0.4);
	const units = Math.ceil(JOBS * 0.6);
	const q = (sql: string, replacements: Record<string, unknown> = {}) => db().query(sql, { replacements: { shopId: shop.id, ...replacements } });

	// Invented names from two short lists; makers are the demo's invented ones.
	await q(`
		INSERT INTO customers (shop_id, name, phone, email, search_text)
		SELECT :shopId, f.name || ' ' || l.name || ' ' || g, '555-' || lpad((g % 10000)::text, 4, '0'), 'c' || g || '@volume.example',
		       lower(f.name || ' ' || l.name || ' ' || g)
		  FROM generate_series(1, :n) g
		  CROSS JOIN LATERAL (SELECT (ARRAY['Ada','Bram','Cato','Della','Emrys','Fen','Greer','Hollis','Ines','Jory','Kit','Linnea'])[1 + g % 12] AS name) f
		  CROSS JOIN LATERAL (SELECT (ARRAY['Ashcombe','Penhallow','Tessaly','Wimbourne','Calloway','Yarrow','Quill','Marlowe','Farrow','Oakes'])[1 + (g / 12) % 10] AS name) l`,
		{ n: customers });
	await q(`
		WITH c AS (SELECT id, row_number() OVER (ORDER BY id) AS r FROM customers WHERE shop_id = :shopId)
		INSERT INTO units (shop_id, customer_id, kind, maker, model, serial, running_watts, starting_watts, voltage, fuel, engine_hours, year_bought, price_paid, condition)
		SELECT :shopId, c.id,
		       (ARRAY['portable','portable','portable','inverter','standby','pressure_washer','other'])[1 + g % 7],
		       (ARRAY['Harrowgate','Ostrander','Brevik Power','Kestrel','Tamworth Engines'])[1 + g % 5],
		       'M-' || (1000 + g % 90), 'SN' || lpad(g::text, 7, '0'), 2000 + (g % 9) * 1000, 2500 + (g % 9) * 1200,
		       CASE WHEN g % 4 = 0 THEN '120' ELSE '120/240' END, 'gasoline', (g % 2000)::numeric, 2010 + g % 16, 400 + (g % 50) * 40,
		       (ARRAY['excellent','good','good','fair','poor'])[1 + g % 5]
		  FROM generate_series(1, :n) g JOIN c ON c.r = 1 + (g % :customers)`,
		{ n: units, customers });
	await q(`
		WITH u AS (SELECT id, customer_id, maker, model, serial, row_number() OVER (ORDER BY id) AS r FROM units WHERE shop_id = :shopId)
		INSERT INTO jobs (shop_id, number, unit_id, customer_id, complaint, status, technician_id, diagnostic_fee, promised_on,
		                  search_text, customer_name, unit_label, technician_name, created_at, status_changed_at, updated_at)
		SELECT :shopId, 1000 + g, u.id, u.customer_id,
		       (ARRAY['Runs but no output','Surges under load','Will not start','Overload light on','Low voltage at outlets','Did not transfer in an outage'])[1 + g % 6],
		       (ARRAY['checked_in','diagnosing','quoted','approved','declined','in_repair','ready','picked_up','picked_up','picked_up'])[1 + g % 10],
		       CASE WHEN g % 9 = 0 THEN NULL ELSE (:techIds::uuid[])[1 + g % ${techIds.length}] END,
		       89, CASE WHEN g % 3 = 0 THEN (now() - (g % 540) * interval '1 day' + interval '5 days')::date END,
		       '', '', '', NULL,
		       now() - (g % 540) * interval '1 day' - (g % 1440) * interval '1 minute',
		       now() - (g % 540) * interval '1 day', now()
		  FROM generate_series(1, :n) g JOIN u ON u.r = 1 + (g % :units)`,
		{ n: JOBS, units, techIds: `{${techIds.join(',')}}` });
	await q(`
		UPDATE jobs j SET ${BOARD_COLUMNS_SQL}
		  FROM customers c, units u
		 WHERE j.shop_id = :shopId AND c.id = j.customer_id AND u.id = j.unit_id`);
	await q(`
		INSERT INTO readings (shop_id, job_id, label, unit, value, min_value, max_value, result)
		SELECT :shopId, j.id, r.label, r.unit, r.value, r.lo, r.hi,
		       CASE WHEN r.value < r.lo THEN 'low' WHEN r.value > r.hi THEN 'high' ELSE 'pass' END
		  FROM jobs j CROSS JOIN LATERAL (VALUES
		       ('Stator main winding 1 resistance', 'Ω', 0.30 + (j.number % 30) / 100.0, 0.3, 0.5),
		       ('Rotor field resistance through brushes and slip rings', 'Ω', 15 + j.number % 90, 20, 90),
		       ('Output voltage, line to neutral, no load', 'V', 110 + j.number % 22, 118, 128)) AS r(label, unit, value, lo, hi)
		 WHERE j.shop_id = :shopId`);
	await q(`UPDATE shops SET next_job_number = 1001 + :n WHERE id = :shopId`, { n: JOBS });
	await db().query('ANALYZE');
	fs.mkdirSync(dataDir, { recursive: true });
	fs.writeFileSync(path.join(dataDir, 'volume-sign-in.json'), JSON.stringify({ email: 'owner@northfield-volume.example', password }, null, 2), { mode: 0o600 });
	console.log(`[mendwise] loaded ${JOBS} jobs in ${((Date.now() - started) / 1000).toFixed(1)} s; owner@northfield-volume.example / ${password}`);
}

main()
	.then(() => closeDb())
	.catch(async (e) => {
		console.error(`[mendwise] volume seed failed: ${e instanceof Error ? e.message : e}`);
		await closeDb().catch(() => {});
		process.exit(1);
	});
