// `npm run seed:volume`: 100,000 invented jobs with their customers, units and readings in a shop
// of their own, for benchmarks. Written in SQL so it takes seconds, not minutes.
import fs from 'node:fs';
import path from 'node:path';
import { createHash, randomBytes } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { hashPassword } from '../src/lib/server/auth/password';
import { closeDb, db } from '../src/lib/server/db/index';
import { Shop, User } from '../src/lib/server/db/models';
import { refreshBoardColumns } from '../src/lib/server/jobs';
import { seedStarterSheets } from '../src/lib/server/specs';
import { DEMO_LABOUR_COST_RATE, TEMPLATES, historyDraft } from '../src/lib/server/demo-history';
import { evaluateRequest } from '../src/lib/pricing/evaluate';
import { defaultPricingSettings, settingsToJson } from '../src/lib/pricing/settings';
import { canonicalJson } from '../src/lib/server/quotes';
import { UNIT_KINDS } from '../src/lib/domain';

export const VOLUME_SHOP = 'Northfield Volume Repair (benchmark data)';
const dataDir = process.env.MENDWISE_DATA_DIR ?? path.resolve(import.meta.dirname, '..', '.data');
const JOBS = Number(process.env.VOLUME_JOBS ?? 100_000);

async function main() {
	db();
	const existing = await Shop.findOne({ where: { name: VOLUME_SHOP } });
	if (existing) {
		const [row] = await db().query<{ n: number }>('SELECT count(*)::int AS n FROM jobs WHERE shop_id = :id', { replacements: { id: existing.id }, type: QueryTypes.SELECT });
		console.log(`[mendwise] the volume shop is already loaded (${row.n} jobs)`);
		await seedVolumeQuotes(existing.id);
		await settle();
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
	await refreshBoardColumns({ shopId: shop.id });
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
	await seedVolumeQuotes(shop.id);
	await settle();
	fs.mkdirSync(dataDir, { recursive: true });
	fs.writeFileSync(path.join(dataDir, 'volume-sign-in.json'), JSON.stringify({ email: 'owner@northfield-volume.example', password }, null, 2), { mode: 0o600 });
	console.log(`[mendwise] loaded ${JOBS} jobs in ${((Date.now() - started) / 1000).toFixed(1)} s; owner@northfield-volume.example / ${password}`);
}

/**
 * Vacuumed as well as analysed: a freshly written table has no page marked all-visible, so until
 * autovacuum comes round every index-only scan of the board would also read the table, and the
 * first benchmark after a load would measure that (and autovacuum running beside it).
 */
async function settle() {
	const started = Date.now();
	await db().query('VACUUM (ANALYZE)');
	console.log(`[mendwise] volume vacuumed and analysed in ${((Date.now() - started) / 1000).toFixed(1)} s`);
}

/*
 * Quotes, versions, answers and actuals for the volume shop, so the report benchmarks have a year
 * and a half of history: three templates per kind of unit priced once by the engine, reused in SQL.
 * Jobs past "diagnosing" have a sent quote (every tenth has two versions); answered jobs an
 * approval or a decline; finished repairs the hours spent (every fifth shared by two people) and
 * now and then a part beyond the quote. Runs once: a shop that already has quotes is left alone.
 */
async function seedVolumeQuotes(shopId: string) {
	const [{ n }] = await db().query<{ n: number }>('SELECT count(*)::int AS n FROM quotes WHERE shop_id = :shopId', { replacements: { shopId }, type: QueryTypes.SELECT });
	if (n > 0) return;
	const started = Date.now();
	const settings = { ...settingsToJson(defaultPricingSettings), labourCostRate: DEMO_LABOUR_COST_RATE };
	const templates = UNIT_KINDS.flatMap((kind) =>
		[0, 1, 2].map((k) => {
			const template = TEMPLATES[kind][k % TEMPLATES[kind].length];
			const draft = historyDraft(kind, template, template.lines, { description: 'Volume unit', ageYears: String(3 + k), engineHours: String(200 + 150 * k), condition: 'good' }, '89.00', k !== 1);
			const content = { currency: 'USD', diagnosticFee: '89.00', unit: draft.unit, options: draft.options, settings };
			const priced = evaluateRequest(content);
			if (!priced.ok) throw new Error(`volume template did not price: ${priced.message}`);
			const billed = template.lines.filter((l) => l.kind === 'labour').reduce((sum, l) => sum + Number(l.hours), 0);
			return { kind, k, content, result: priced.result, hash: createHash('sha256').update(canonicalJson(content)).digest('hex'), billed };
		})
	);
	const staff = await User.findAll({ where: { shopId }, order: [['email', 'ASC']] });
	const owner = staff.find((u) => u.role === 'owner')!;
	const techIds = staff.filter((u) => u.role === 'technician').map((u) => u.id);
	const replacements = { shopId, owner: owner.id, techIds: `{${techIds.join(',')}}`, templates: JSON.stringify(templates) };
	// One transaction with the report triggers deferred, then one refresh of every quoted job.
	const transaction = await db().transaction();
	const q = (sql: string) => db().query(sql, { replacements, transaction });
	try {
		await q(`SET LOCAL mendwise.defer_reports = 'on'`);
		const TPL = `tpl AS (SELECT * FROM jsonb_to_recordset(:templates::jsonb) AS x(kind text, k int, content jsonb, result jsonb, hash text, billed numeric))`;
		const APPROVED = `j.status IN ('approved', 'in_repair', 'ready') OR (j.status = 'picked_up' AND j.number % 7 <> 0)`;
		await q(`
			WITH ${TPL}
			INSERT INTO quotes (shop_id, job_id, draft, sent_versions, edited_since_send, updated_by, created_at, updated_at)
			SELECT :shopId, j.id, jsonb_build_object('unit', t.content->'unit', 'options', t.content->'options'),
			       CASE WHEN j.number % 10 = 0 THEN 2 ELSE 1 END, false, :owner, j.created_at, j.created_at
			  FROM jobs j JOIN units u ON u.id = j.unit_id JOIN tpl t ON t.kind = u.kind AND t.k = j.number % 3
			 WHERE j.shop_id = :shopId AND j.status NOT IN ('checked_in', 'diagnosing')`);
		await q(`
			WITH ${TPL}
			INSERT INTO quote_versions (shop_id, quote_id, number, content, result, content_hash, currency, valid_until, sent_by, sent_at)
			SELECT :shopId, qt.id, v, t.content, t.result, t.hash, 'USD', (s.sent_at + interval '30 days')::date, :owner, s.sent_at
			  FROM quotes qt JOIN jobs j ON j.id = qt.job_id JOIN units u ON u.id = j.unit_id
			  JOIN tpl t ON t.kind = u.kind AND t.k = j.number % 3
			  CROSS JOIN LATERAL generate_series(1, qt.sent_versions) v
			  CROSS JOIN LATERAL (SELECT least(now() - interval '1 minute',
			       j.created_at + (0.3 + (j.number % 5) * 0.4) * interval '1 day' + (v - 1) * interval '2 days') AS sent_at) s
			 WHERE qt.shop_id = :shopId`);
		await q(`
			INSERT INTO approvals (shop_id, quote_id, version_id, decision, option_index, option_label, signer_name, reason, client_address, version_hash, created_at)
			SELECT :shopId, qt.id, v.id, d.decision, d.option_index,
			       CASE WHEN d.option_index IS NOT NULL THEN v.content->'options'->d.option_index->>'label' END,
			       CASE WHEN d.decision = 'approved' THEN j.customer_name END,
			       CASE WHEN d.decision = 'declined' THEN 'Not now.' ELSE '' END, 'volume', v.content_hash,
			       least(now(), v.sent_at + (4 + (j.number % 97) * 1.3) * interval '1 hour')
			  FROM quotes qt JOIN jobs j ON j.id = qt.job_id
			  JOIN quote_versions v ON v.quote_id = qt.id AND v.number = qt.sent_versions
			  CROSS JOIN LATERAL (SELECT CASE WHEN ${APPROVED} THEN 'approved' ELSE 'declined' END AS decision,
			       CASE WHEN ${APPROVED} THEN CASE WHEN j.number % 6 = 0 THEN 1 ELSE 0 END END AS option_index) d
			 WHERE qt.shop_id = :shopId AND j.status IN ('approved', 'declined', 'in_repair', 'ready', 'picked_up')`);
		// Hours really spent: 0.8× to 1.6× the hours billed, in quarter hours.
		await q(`
			WITH ${TPL},
			done AS (
				SELECT j.id, j.number, a.created_at, coalesce(j.technician_id, (:techIds::uuid[])[1]) AS tech,
				       (:techIds::uuid[])[1 + (j.number + 1) % array_length(:techIds::uuid[], 1)] AS helper,
				       greatest(0.25, round(t.billed * (0.8 + (j.number % 9) * 0.1) * 4) / 4) AS spent
				  FROM jobs j JOIN units u ON u.id = j.unit_id JOIN tpl t ON t.kind = u.kind AND t.k = j.number % 3
				  JOIN quotes qt ON qt.job_id = j.id JOIN approvals a ON a.quote_id = qt.id
				 WHERE j.shop_id = :shopId AND j.status IN ('ready', 'picked_up') AND a.decision = 'approved' AND a.option_index = 0)
			INSERT INTO job_labour (shop_id, job_id, technician_id, hours, worked_on, recorded_by, created_at)
			SELECT :shopId, d.id, p.who, p.hours, (d.created_at + interval '1 day')::date, p.who, d.created_at + interval '1 day'
			  FROM done d CROSS JOIN LATERAL (
			       SELECT d.tech AS who, CASE WHEN d.number % 5 = 0 AND d.helper <> d.tech THEN d.spent - greatest(0.25, round(d.spent * 0.3 * 4) / 4) ELSE d.spent END AS hours
			       UNION ALL
			       SELECT d.helper, greatest(0.25, round(d.spent * 0.3 * 4) / 4) WHERE d.number % 5 = 0 AND d.helper <> d.tech) p
			 WHERE p.hours > 0`);
		await q(`
			INSERT INTO job_extra_parts (shop_id, job_id, description, quantity, unit_cost, recorded_by, created_at)
			SELECT :shopId, l.job_id, 'Gasket set', 1, 5 + j.number % 40, l.technician_id, l.created_at
			  FROM job_labour l JOIN jobs j ON j.id = l.job_id
			 WHERE l.shop_id = :shopId AND j.number % 10 = 3 AND l.technician_id = coalesce(j.technician_id, (:techIds::uuid[])[1])`);
		await q(`SET LOCAL mendwise.defer_reports = 'off'`);
		await q(`SELECT report_refresh_jobs(ARRAY(SELECT job_id FROM quotes WHERE shop_id = :shopId))`);
		await transaction.commit();
	} catch (e) {
		await transaction.rollback();
		throw e;
	}
	const [{ rows }] = await db().query<{ rows: number }>('SELECT count(*)::int AS rows FROM job_outcomes WHERE shop_id = :shopId', { replacements, type: QueryTypes.SELECT });
	console.log(`[mendwise] volume quotes, answers and actuals: ${rows} quoted jobs in ${((Date.now() - started) / 1000).toFixed(1)} s`);
}

main()
	.then(() => closeDb())
	.catch(async (e) => {
		console.error(`[mendwise] volume seed failed: ${e instanceof Error ? e.message : e}`);
		await closeDb().catch(() => {});
		process.exit(1);
	});
