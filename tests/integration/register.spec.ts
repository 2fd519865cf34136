/**
 * The register and the read pages' services against a real MariaDB (DB_* from env). The test
 * builds its own small plant under two sites with unique codes, scopes every assertion to them
 * (so other data in the database does not matter) and removes them afterwards.
 * The expected orders and sets are derived from the fixture below by the rules the register
 * promises (filters, nulls last, tag then id as tie-breakers), not copied from the output.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { migrateUp } from '../../src/lib/server/db/migrator';
import { closeDatabase, sequelize } from '../../src/lib/server/db/connection';
import {
	Area,
	Asset,
	initModels,
	ModelRevision,
	Note,
	PlantModel,
	Site,
	TuningSet,
	User
} from '../../src/lib/server/db/models';
import { listRegister, type Actor, type RegisterRow } from '../../src/lib/server/register';
import { getArea, getSite, hierarchyOptions, listSites } from '../../src/lib/server/sites';
import { getAssetPage } from '../../src/lib/server/assets';
import { getModelPage } from '../../src/lib/server/models';
import { NotFound } from '../../src/lib/server/errors';
import { parseRegisterQuery, REGISTER_SORT_VALUES, type RegisterQuery, type RegisterSort } from '../../src/lib/schemas/register';
import { load as registerLoad } from '../../src/routes/(app)/register/+page.server';

const U = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e4)}`.toUpperCase();
const TODAY = '2026-03-14';
const addDays = (d: string, n: number) => new Date(Date.parse(`${d}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);

type Structure = 'fopdt' | 'sopdt' | 'ipdt' | 'second_order' | 'rational';
interface Spec {
	key: string;
	title: string;
	asset: string;
	structure: Structure;
	gain: number | null;
	tau: number | null;
	theta: number;
	revalidateBy: string | null;
	/** Date the shown (approved) revision was approved; null = never approved. */
	approvedOn: string | null;
	/** Revision states after the first; the first is approved when approvedOn is set, else draft/in_review. */
	firstState?: 'draft' | 'in_review';
	later?: Array<'in_review' | 'draft' | 'approved'>;
	withdrawn?: boolean;
}

const ASSETS = {
	'TIC-101': { name: 'Oven zone one heater', kind: 'oven', area: 'A1' },
	'TIC-102': { name: 'Oven zone two heater', kind: 'oven', area: 'A1' },
	'MIC-201': { name: 'Proofer humidity fan', kind: 'fan', area: 'A2' },
	'LIC-202': { name: 'Flour silo level', kind: 'tank', area: 'A2' }
} as const;
type AssetTag = keyof typeof ASSETS;

const SPECS: Spec[] = [
	{ key: 'm1', title: 'Zone one heater at 60 % load', asset: 'TIC-101', structure: 'fopdt', gain: 0.82, tau: 312, theta: 45, revalidateBy: addDays(TODAY, 200), approvedOn: '2025-05-01' },
	{ key: 'm2', title: 'Zone two heater', asset: 'TIC-102', structure: 'sopdt', gain: 1.6, tau: 240, theta: 20, revalidateBy: addDays(TODAY, 90), approvedOn: '2025-03-01', later: ['in_review'] },
	{ key: 'm3', title: 'Silo level from feed rate', asset: 'LIC-202', structure: 'ipdt', gain: 0.002, tau: null, theta: 30, revalidateBy: addDays(TODAY, -10), approvedOn: '2024-11-11' },
	{ key: 'm4', title: 'Humidity from fan speed (new)', asset: 'MIC-201', structure: 'fopdt', gain: 2.5, tau: 12, theta: 1.5, revalidateBy: null, approvedOn: null, firstState: 'draft' },
	{ key: 'm5', title: 'Zone one heater, retired', asset: 'TIC-101', structure: 'fopdt', gain: 0.7, tau: 280, theta: 50, revalidateBy: addDays(TODAY, -300), approvedOn: '2023-02-02', withdrawn: true },
	{ key: 'm6', title: 'Humidity rational fit 100%', asset: 'MIC-201', structure: 'rational', gain: null, tau: null, theta: 3, revalidateBy: addDays(TODAY, 10), approvedOn: '2025-08-20' },
	{ key: 'm7', title: 'Zone two, standard second order', asset: 'TIC-102', structure: 'second_order', gain: 1.1, tau: 40, theta: 0, revalidateBy: addDays(TODAY, 400), approvedOn: '2025-01-15' },
	{ key: 'm8', title: 'Silo level, first order try', asset: 'LIC-202', structure: 'fopdt', gain: 0.05, tau: 900, theta: 60, revalidateBy: addDays(TODAY, 30), approvedOn: null, firstState: 'in_review' }
];

const ids: Record<string, number> = {};
const assetIds: Record<string, number> = {};
const siteIds: Record<string, number> = {};
const areaIds: Record<string, number> = {};
const users: Record<'viewer' | 'engineer' | 'reviewer', Actor & { name: string }> = {} as never;
const bulkModelIds: number[] = [];

const STRUCTURE_ORDER: Structure[] = ['fopdt', 'sopdt', 'ipdt', 'second_order', 'rational'];

function specState(s: Spec) {
	return s.withdrawn ? 'withdrawn' : s.approvedOn ? 'approved' : 'draft';
}
function specInReview(s: Spec) {
	return (s.approvedOn === null && s.firstState === 'in_review') || (s.later ?? []).includes('in_review');
}
function stateRank(s: Spec) {
	if (s.withdrawn) return 4;
	if (!s.approvedOn) return specInReview(s) ? 1 : 0;
	return specInReview(s) ? 2 : 3;
}

async function revisionRow(spec: Spec, modelId: number, no: number, state: string, approvedOn: string | null, authorId: number, reviewerId: number | null) {
	const params: Record<string, number> = { theta: spec.theta };
	if (spec.gain !== null) params.k = spec.gain;
	if (spec.tau !== null) params.tau = spec.tau;
	return ModelRevision.create({
		model_id: modelId,
		revision_no: no,
		state: state as never,
		structure: spec.structure,
		parameters: params,
		num: [spec.gain ?? 1],
		den: spec.tau ? [spec.tau, 1] : [1, 0],
		delay_s: spec.theta,
		gain: spec.gain,
		time_constant_s: spec.tau,
		time_unit: spec.tau && spec.tau > 200 ? 'min' : 's',
		mv_name: 'Heater output',
		mv_unit: '%',
		mv_min: 0,
		mv_max: 100,
		pv_name: 'Zone temperature',
		pv_unit: '°C',
		pv_min: 0,
		pv_max: 300,
		op_mv: 60,
		op_pv: 220,
		op_note: null,
		method: 'step_test',
		test_date: '2025-02-01',
		data_attachment_id: null,
		fit_r2: 0.987,
		fit_rmse: 0.41,
		valid_range: '40–80 % output',
		revalidate_by: spec.revalidateBy,
		change_summary: `revision ${no}`,
		review_comment: null,
		author_id: authorId,
		reviewer_id: reviewerId,
		submitted_at: state === 'draft' ? null : new Date(`${approvedOn ?? '2026-01-01'}T08:00:00Z`),
		reviewed_at: approvedOn ? new Date(`${approvedOn}T09:00:00Z`) : null,
		approved_at: approvedOn ? new Date(`${approvedOn}T09:00:00Z`) : null
	});
}

beforeAll(async () => {
	await migrateUp();
	initModels();
	for (const role of ['viewer', 'engineer', 'reviewer'] as const) {
		const u = await User.create({ email: `${role}-${U}@register.test`, name: `Test ${role} ${U}`, role, password_hash: 'x', last_sign_in_at: null });
		users[role] = { id: u.id, role, name: u.name };
	}
	const a = await Site.create({ code: `TA${U}`, name: `Test bakery ${U}`, description: 'fixture' });
	const b = await Site.create({ code: `TB${U}`, name: `Test dairy ${U}`, description: null });
	siteIds.A = a.id;
	siteIds.B = b.id;
	areaIds.A1 = (await Area.create({ site_id: a.id, code: 'OVN', name: 'Ovens', description: null })).id;
	areaIds.A2 = (await Area.create({ site_id: a.id, code: 'PRF', name: 'Proofing', description: null })).id;
	areaIds.B1 = (await Area.create({ site_id: b.id, code: 'PAS', name: 'Pasteurisation', description: null })).id;
	for (const [tag, info] of Object.entries(ASSETS)) {
		const asset = await Asset.create({ site_id: a.id, area_id: areaIds[info.area], tag: `${tag}-${U}`, kind: info.kind, name: info.name, description: null });
		assetIds[tag] = asset.id;
	}
	const eng = users.engineer.id;
	const rev = users.reviewer.id;
	for (const spec of SPECS) {
		const pm = await PlantModel.create({
			asset_id: assetIds[spec.asset as AssetTag],
			title: spec.title,
			status: spec.withdrawn ? 'withdrawn' : spec.approvedOn ? 'active' : 'draft',
			approved_revision_id: null,
			withdrawn_at: spec.withdrawn ? new Date('2025-12-01T00:00:00Z') : null,
			withdrawn_by: spec.withdrawn ? rev : null,
			withdrawn_reason: spec.withdrawn ? 'Heater replaced' : null,
			created_by: eng
		});
		ids[spec.key] = pm.id;
		const first = await revisionRow(spec, pm.id, 1, spec.approvedOn ? 'approved' : (spec.firstState ?? 'draft'), spec.approvedOn, eng, spec.approvedOn ? rev : null);
		if (spec.approvedOn) await pm.update({ approved_revision_id: first.id });
		let no = 2;
		for (const st of spec.later ?? []) await revisionRow({ ...spec, gain: (spec.gain ?? 1) * 2 }, pm.id, no++, st, null, eng, null);
	}
	// Site B: 27 approved FOPDT models on one asset, for paging.
	const pasteuriser = await Asset.create({ site_id: b.id, area_id: areaIds.B1, tag: `TIC-301-${U}`, kind: 'heat_exchanger', name: 'Pasteuriser hold tube', description: null });
	for (let i = 0; i < 27; i++) {
		const spec: Spec = { key: `b${i}`, title: `Hold tube model ${String(i).padStart(2, '0')}`, asset: 'x', structure: 'fopdt', gain: 1 + i / 10, tau: 30 + i, theta: 2, revalidateBy: addDays(TODAY, 100), approvedOn: '2025-06-01' };
		const pm = await PlantModel.create({ asset_id: pasteuriser.id, title: spec.title, status: 'active', approved_revision_id: null, withdrawn_at: null, withdrawn_by: null, withdrawn_reason: null, created_by: eng });
		const r = await revisionRow(spec, pm.id, 1, 'approved', spec.approvedOn, eng, rev);
		await pm.update({ approved_revision_id: r.id });
		bulkModelIds.push(pm.id);
	}
	// Tuning sets and a note on m1.
	const m1rev = (await PlantModel.findByPk(ids.m1))!.approved_revision_id!;
	const ts = { model_id: ids.m1, model_revision_id: m1rev, controller_type: 'PI' as const, form: 'ideal' as const, kp: 1.9, ti_s: 312, td_s: null, filter_n: null, weight_b: null, weight_c: null, rule: 'simc', rule_parameter: 45, predicted: null, notes: null, review_comment: null, author_id: eng, submitted_at: null, reviewed_at: null };
	await TuningSet.create({ ...ts, loop_tag: `TIC-101-${U}`, state: 'approved', reviewer_id: rev, approved_at: new Date('2025-05-02T10:00:00Z') });
	await TuningSet.create({ ...ts, loop_tag: `TIC-101-${U}`, state: 'draft', kp: 2.4, reviewer_id: null, approved_at: null });
	await Note.create({ model_id: ids.m1, title: 'How the bump was made', body_md: 'Step of $\\Delta u = 5\\,\\%$ at **60 %** output.<script>alert(1)</script>', author_id: eng });
}, 120_000);

afterAll(async () => {
	const all = [...Object.values(ids), ...bulkModelIds];
	if (all.length) {
		await TuningSet.destroy({ where: { model_id: all } });
		await Note.destroy({ where: { model_id: all } });
		await PlantModel.update({ approved_revision_id: null }, { where: { id: all } });
		await ModelRevision.destroy({ where: { model_id: all } });
		await PlantModel.destroy({ where: { id: all } });
	}
	await Asset.destroy({ where: { site_id: Object.values(siteIds) } });
	await Area.destroy({ where: { site_id: Object.values(siteIds) } });
	await Site.destroy({ where: { id: Object.values(siteIds) } });
	await User.destroy({ where: { id: Object.values(users).map((u) => u.id) } });
	await closeDatabase();
});

const q = (over: Partial<RegisterQuery> = {}): RegisterQuery => ({ sort: 'tag', dir: 'asc', page: 1, site: siteIds.A, ...over });
const keysOf = (rows: RegisterRow[]) => rows.map((r) => SPECS.find((s) => ids[s.key] === r.id)?.key ?? `?${r.id}`);
const visible = (role: 'viewer' | 'engineer') => SPECS.filter((s) => !s.withdrawn && (role !== 'viewer' || s.approvedOn));
const keys = (specs: Spec[]) => specs.map((s) => s.key);
const tagOf = (s: Spec) => `${s.asset}-${U}`.toLowerCase();

/** The register's ordering rule, restated from its promise: key (nulls last), then tag, then id. */
function expectedOrder(specs: Spec[], sort: RegisterSort, dir: 'asc' | 'desc'): string[] {
	const assetName = (s: Spec) => ASSETS[s.asset as AssetTag].name.toLowerCase();
	const areaName = (s: Spec) => (ASSETS[s.asset as AssetTag].area === 'A1' ? 'ovens' : 'proofing');
	const keyOf: Record<RegisterSort, (s: Spec) => Array<string | number | null>> = {
		tag: (s) => [tagOf(s)],
		asset: (s) => [assetName(s)],
		title: (s) => [s.title.toLowerCase()],
		site: (s) => [`test bakery ${U}`.toLowerCase(), areaName(s)],
		area: (s) => [areaName(s)],
		structure: (s) => [STRUCTURE_ORDER.indexOf(s.structure)],
		gain: (s) => [s.gain],
		tau: (s) => [s.tau],
		theta: (s) => [s.theta],
		state: (s) => [stateRank(s)],
		revalidate: (s) => [s.revalidateBy],
		approved: (s) => [s.approvedOn]
	};
	const sign = dir === 'asc' ? 1 : -1;
	return [...specs]
		.sort((x, y) => {
			const kx = keyOf[sort](x);
			const ky = keyOf[sort](y);
			for (let i = 0; i < kx.length; i++) {
				const a = kx[i];
				const b = ky[i];
				if (a === b) continue;
				if (a === null) return 1;
				if (b === null) return -1;
				return (a < b ? -1 : 1) * sign;
			}
			if (tagOf(x) !== tagOf(y)) return tagOf(x) < tagOf(y) ? -1 : 1;
			return ids[x.key] - ids[y.key];
		})
		.map((s) => s.key);
}

describe('register listing', () => {
	it('lists the visible models of a site with their facts', async () => {
		const page = await listRegister(users.engineer, q(), { today: TODAY });
		expect(page.total).toBe(7);
		expect(new Set(keysOf(page.rows))).toEqual(new Set(keys(visible('engineer'))));
		const m1 = page.rows.find((r) => r.id === ids.m1)!;
		expect(m1).toMatchObject({
			title: 'Zone one heater at 60 % load',
			asset: { id: assetIds['TIC-101'], tag: `TIC-101-${U}`, name: 'Oven zone one heater', kind: 'oven' },
			site: { id: siteIds.A, code: `TA${U}`, name: `Test bakery ${U}` },
			area: { id: areaIds.A1, code: 'OVN', name: 'Ovens' },
			revision: { no: 1, state: 'approved', structure: 'fopdt', gain: 0.82, timeConstantSeconds: 312, delaySeconds: 45, timeUnit: 'min', mvUnit: '%', pvUnit: '°C', revalidateBy: addDays(TODAY, 200), parameters: { k: 0.82, tau: 312, theta: 45 } },
			state: 'approved',
			inReview: false,
			stale: false,
			lastApprovedAt: '2025-05-01T09:00:00.000Z'
		});
		const m2 = page.rows.find((r) => r.id === ids.m2)!;
		expect(m2.state).toBe('approved');
		expect(m2.inReview).toBe(true);
		expect(m2.revision.no).toBe(1); // the approved revision, not the one in review
		expect(m2.revision.gain).toBe(1.6);
		const m4 = page.rows.find((r) => r.id === ids.m4)!;
		expect(m4.state).toBe('draft');
		// A free integrator (IPDT, or a rational denominator ending in 0) makes the gain a rate.
		const integrating = Object.fromEntries(page.rows.map((r) => [keysOf([r])[0], r.revision.integrating]));
		expect(integrating).toEqual({ m1: false, m2: false, m3: true, m4: false, m6: true, m7: false, m8: false });
		expect(m4.lastApprovedAt).toBeNull();
	});

	it('shows viewers approved models only', async () => {
		const page = await listRegister(users.viewer, q(), { today: TODAY });
		expect(new Set(keysOf(page.rows))).toEqual(new Set(keys(visible('viewer'))));
		expect(page.rows.every((r) => r.state === 'approved')).toBe(true);
		const drafts = await listRegister(users.viewer, q({ state: 'draft' }), { today: TODAY });
		expect(drafts.total).toBe(0);
	});

	it.each([
		['approved', (s: Spec) => !s.withdrawn && !!s.approvedOn],
		['draft', (s: Spec) => !s.withdrawn && !s.approvedOn],
		['in_review', (s: Spec) => !s.withdrawn && specInReview(s)],
		['withdrawn', (s: Spec) => !!s.withdrawn]
	] as const)('filters by state %s', async (state, pick) => {
		const page = await listRegister(users.engineer, q({ state }), { today: TODAY });
		expect(new Set(keysOf(page.rows))).toEqual(new Set(keys(SPECS.filter(pick))));
		expect(page.rows.every((r) => r.state === (state === 'in_review' ? r.state : state))).toBe(true);
	});

	it('flags and filters stale models (revalidate-by before today)', async () => {
		const all = await listRegister(users.engineer, q(), { today: TODAY });
		expect(keysOf(all.rows.filter((r) => r.stale))).toEqual(['m3']);
		const stale = await listRegister(users.engineer, q({ stale: true }), { today: TODAY });
		expect(keysOf(stale.rows)).toEqual(['m3']);
		// The day after m6's date it is stale too; the withdrawn m5 never counts.
		const later = await listRegister(users.engineer, q({ stale: true }), { today: addDays(TODAY, 11) });
		expect(new Set(keysOf(later.rows))).toEqual(new Set(['m3', 'm6']));
		// On its date a model is not yet stale.
		const onDate = await listRegister(users.engineer, q({ stale: true }), { today: addDays(TODAY, 10) });
		expect(keysOf(onDate.rows)).toEqual(['m3']);
	});

	it('filters by area, asset kind and structure', async () => {
		const a2 = await listRegister(users.engineer, q({ area: areaIds.A2 }), { today: TODAY });
		expect(new Set(keysOf(a2.rows))).toEqual(new Set(['m3', 'm4', 'm6', 'm8']));
		const ovens = await listRegister(users.engineer, q({ kind: 'oven' }), { today: TODAY });
		expect(new Set(keysOf(ovens.rows))).toEqual(new Set(['m1', 'm2', 'm7']));
		const fopdt = await listRegister(users.engineer, q({ structure: 'fopdt' }), { today: TODAY });
		expect(new Set(keysOf(fopdt.rows))).toEqual(new Set(['m1', 'm4', 'm8']));
		const none = await listRegister(users.engineer, q({ area: areaIds.B1 }), { today: TODAY });
		expect(none.total).toBe(0);
		expect(none.rows).toEqual([]);
		expect(none.pageCount).toBe(1);
	});

	it('filters by text in tag, asset name or title, case-insensitively, with wildcards taken literally', async () => {
		const byTag = await listRegister(users.engineer, q({ q: 'lic-202' }), { today: TODAY });
		expect(new Set(keysOf(byTag.rows))).toEqual(new Set(['m3', 'm8']));
		const byAsset = await listRegister(users.engineer, q({ q: 'ZONE TWO HEATER' }), { today: TODAY });
		expect(new Set(keysOf(byAsset.rows))).toEqual(new Set(['m2', 'm7']));
		const byTitle = await listRegister(users.engineer, q({ q: 'rational fit' }), { today: TODAY });
		expect(keysOf(byTitle.rows)).toEqual(['m6']);
		const percent = await listRegister(users.engineer, q({ q: '%' }), { today: TODAY });
		expect(new Set(keysOf(percent.rows))).toEqual(new Set(['m1', 'm6'])); // titles with a literal %
		const underscore = await listRegister(users.engineer, q({ q: '_' }), { today: TODAY });
		expect(underscore.total).toBe(0);
	});

	const sortCases = REGISTER_SORT_VALUES.flatMap((sort) => (['asc', 'desc'] as const).map((dir) => [sort, dir] as const));
	it.each(sortCases)('sorts by %s %s', async (sort, dir) => {
		const page = await listRegister(users.engineer, q({ sort, dir }), { today: TODAY });
		expect(keysOf(page.rows)).toEqual(expectedOrder(visible('engineer'), sort, dir));
	});

	it('pages by 25 and clamps a page past the end', async () => {
		const site = siteIds.B;
		const p1 = await listRegister(users.viewer, q({ site, sort: 'title' }), { today: TODAY });
		expect(p1).toMatchObject({ total: 27, page: 1, pageCount: 2, pageSize: 25 });
		expect(p1.rows).toHaveLength(25);
		const p2 = await listRegister(users.viewer, q({ site, sort: 'title', page: 2 }), { today: TODAY });
		expect(p2.rows).toHaveLength(2);
		expect(p2.page).toBe(2);
		const titles = [...p1.rows, ...p2.rows].map((r) => r.title);
		expect(titles).toEqual(Array.from({ length: 27 }, (_, i) => `Hold tube model ${String(i).padStart(2, '0')}`));
		const p9 = await listRegister(users.viewer, q({ site, sort: 'title', page: 9 }), { today: TODAY });
		expect(p9.page).toBe(2);
		expect(p9.rows.map((r) => r.id)).toEqual(p2.rows.map((r) => r.id));
	});

	it('runs one SQL query for a page', async () => {
		const spy = vi.spyOn(sequelize(), 'query');
		try {
			await listRegister(users.engineer, q({ sort: 'gain', dir: 'desc', q: 'heater', stale: undefined }), { today: TODAY });
			expect(spy).toHaveBeenCalledTimes(1);
		} finally {
			spy.mockRestore();
		}
	});

	it('answers a viewer who asks for no permission it lacks', async () => {
		await expect(listRegister({ id: 0, role: 'nobody' as never }, q())).rejects.toThrow(/permission/i);
	});
});

describe('register page load', () => {
	const event = (search: string, user: Actor & { name: string }) =>
		({ url: new URL(`http://localhost/register${search}`), locals: { user: { ...user, email: 'x@y', mustChangePassword: false } } }) as never;

	it('falls back to defaults for bad parameters and names the fields', async () => {
		const data = (await registerLoad(event(`?site=${siteIds.A}&sort=colour&page=0&dir=sideways&kind=rocket`, users.engineer))) as Record<string, unknown>;
		const issues = data.issues as Array<{ field: string; message: string }>;
		expect(issues.map((i) => i.field).sort()).toEqual(['dir', 'kind', 'page', 'sort']);
		expect(issues.find((i) => i.field === 'sort')!.message).toBe('sort is not a sortable column');
		const query = data.query as RegisterQuery;
		expect(query).toMatchObject({ site: siteIds.A, sort: 'tag', dir: 'asc', page: 1 });
		expect(query.kind).toBeUndefined();
		const page = data.page as { total: number };
		expect(page.total).toBe(7);
	});

	it('reads the filters from the URL', async () => {
		const data = (await registerLoad(event(`?site=${siteIds.A}&structure=fopdt&sort=gain&dir=desc`, users.viewer))) as Record<string, unknown>;
		expect(data.issues).toEqual([]);
		const rows = (data.page as { rows: RegisterRow[] }).rows;
		expect(keysOf(rows)).toEqual(['m1']); // viewer: the fopdt drafts m4, m8 are hidden
	});

	it('parses with the shared schema', () => {
		expect(parseRegisterQuery(new URLSearchParams('page=0')).issues[0].field).toBe('page');
	});
});

describe('sites, areas and assets', () => {
	it('counts areas, assets, visible models and stale ones per site', async () => {
		const eng = (await listSites(users.engineer, TODAY)).find((s) => s.id === siteIds.A)!;
		expect(eng).toMatchObject({ areaCount: 2, assetCount: 4, modelCount: 7, staleCount: 1 });
		const viewer = (await listSites(users.viewer, TODAY)).find((s) => s.id === siteIds.A)!;
		expect(viewer.modelCount).toBe(5);
		const b = (await listSites(users.viewer, TODAY)).find((s) => s.id === siteIds.B)!;
		expect(b).toMatchObject({ areaCount: 1, assetCount: 1, modelCount: 27, staleCount: 0 });
	});

	it('gives a site with its areas', async () => {
		const site = await getSite(users.engineer, siteIds.A, TODAY);
		expect(site.areas.map((a) => [a.name, a.assetCount, a.modelCount, a.staleCount])).toEqual([
			['Ovens', 2, 3, 0],
			['Proofing', 2, 4, 1]
		]);
		await expect(getSite(users.engineer, 4_000_000_000, TODAY)).rejects.toBeInstanceOf(NotFound);
	});

	it('gives an area with its assets', async () => {
		const area = await getArea(users.engineer, areaIds.A2, TODAY);
		expect(area.site.id).toBe(siteIds.A);
		expect(area.assets.map((a) => [a.tag, a.modelCount, a.inReviewCount, a.staleCount])).toEqual([
			[`LIC-202-${U}`, 2, 1, 1],
			[`MIC-201-${U}`, 2, 0, 0]
		]);
		const viewerArea = await getArea(users.viewer, areaIds.A2, TODAY);
		expect(viewerArea.assets.map((a) => a.modelCount)).toEqual([1, 1]);
		await expect(getArea(users.engineer, 4_000_000_000, TODAY)).rejects.toBeInstanceOf(NotFound);
	});

	it('offers every site and area as filter options', async () => {
		const opts = await hierarchyOptions(users.viewer);
		expect(opts.sites.filter((s) => s.id === siteIds.A || s.id === siteIds.B)).toHaveLength(2);
		expect(opts.areas.filter((a) => a.siteId === siteIds.A).map((a) => a.name)).toEqual(['Ovens', 'Proofing']);
	});

	it('gives an asset with its models, withdrawn ones apart, and tuning sets by role', async () => {
		const eng = await getAssetPage(users.engineer, assetIds['TIC-101'], TODAY);
		expect(eng).toMatchObject({ tag: `TIC-101-${U}`, kind: 'oven', site: { id: siteIds.A }, area: { id: areaIds.A1 } });
		expect(keysOf(eng.models)).toEqual(['m1']);
		expect(keysOf(eng.withdrawnModels)).toEqual(['m5']);
		expect(eng.tuningSets.map((t) => t.state)).toEqual(['approved', 'draft']);
		const viewer = await getAssetPage(users.viewer, assetIds['TIC-101'], TODAY);
		expect(viewer.tuningSets.map((t) => [t.state, t.kp, t.tiSeconds])).toEqual([['approved', 1.9, 312]]);
		await expect(getAssetPage(users.viewer, 4_000_000_000, TODAY)).rejects.toBeInstanceOf(NotFound);
	});
});

describe('model page', () => {
	it('shows the approved revision, the pending one and the full history to an engineer', async () => {
		const m = await getModelPage(users.engineer, ids.m2, TODAY);
		expect(m.isApproved).toBe(true);
		expect(m.revision.no).toBe(1);
		expect(m.revision.parameters).toEqual({ k: 1.6, tau: 240, theta: 20 });
		expect(m.revision.author.name).toBe(users.engineer.name);
		expect(m.revision.reviewer?.name).toBe(users.reviewer.name);
		expect(m.revision.approvedAt).toBe('2025-03-01T09:00:00.000Z');
		expect(m.pending).toMatchObject({ no: 2, state: 'in_review', authorName: users.engineer.name });
		expect(m.history.map((h) => [h.no, h.state])).toEqual([
			[2, 'in_review'],
			[1, 'approved']
		]);
	});

	it('hides pending work from a viewer', async () => {
		const m = await getModelPage(users.viewer, ids.m2, TODAY);
		expect(m.pending).toBeNull();
		expect(m.history.map((h) => h.no)).toEqual([1]);
	});

	it('gives provenance, stale flag, sanitised notes and tuning sets', async () => {
		const m3 = await getModelPage(users.viewer, ids.m3, TODAY);
		expect(m3.stale).toBe(true);
		expect(m3.revision.provenance).toMatchObject({ method: 'step_test', testDate: '2025-02-01', fitR2: 0.987, fitRmse: 0.41, revalidateBy: addDays(TODAY, -10) });
		const m1 = await getModelPage(users.viewer, ids.m1, TODAY);
		expect(m1.stale).toBe(false);
		expect(m1.notes).toHaveLength(1);
		expect(m1.notes[0].html).toContain('class="katex"');
		expect(m1.notes[0].html).not.toContain('<script');
		expect(m1.tuningSets.map((t) => t.state)).toEqual(['approved']);
		expect(m1.revision.mv).toEqual({ name: 'Heater output', unit: '%', min: 0, max: 100 });
		expect(m1.revision.operatingPoint).toEqual({ mv: 60, pv: 220, note: null });
	});

	it('shows a never-approved model to an engineer as a draft and to a viewer not at all', async () => {
		const m4 = await getModelPage(users.engineer, ids.m4, TODAY);
		expect(m4.isApproved).toBe(false);
		expect(m4.revision.state).toBe('draft');
		await expect(getModelPage(users.viewer, ids.m4, TODAY)).rejects.toBeInstanceOf(NotFound);
		await expect(getModelPage(users.viewer, 4_000_000_000, TODAY)).rejects.toBeInstanceOf(NotFound);
	});

	it('marks a withdrawn model with its reason', async () => {
		const m5 = await getModelPage(users.viewer, ids.m5, TODAY);
		expect(m5.status).toBe('withdrawn');
		expect(m5.withdrawn?.reason).toBe('Heater replaced');
		expect(m5.stale).toBe(false);
	});
});
