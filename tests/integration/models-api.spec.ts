/**
 * The JSON API for models and assets, the export files and the model form's actions, against a
 * real MariaDB (DB_* from env; the database is reset and migrated). The route handlers are called
 * with the request event hooks would pass them: `locals.user` from a session, or from an API token
 * through `userForToken` exactly as `hooks.server.ts` does.
 *
 * - GET /api/v1/models: filters, text, sort, paging (25 a page), 400 naming the bad parameter,
 *   viewer visibility; GET /api/v1/models/:id and /api/v1/assets/:id: documents, 400 for a bad id,
 *   404 JSON for a missing one; a revoked token resolves to nobody.
 * - The form actions: an invalid form stores nothing (no model, no revision, no audit event); a
 *   valid one creates the model with a draft revision and its audit event in one transaction; a
 *   service refusal (duplicate tag) keeps the values; editing a draft with a stale version is a 409
 *   carrying the stored values and changes nothing.
 * Values are invented (Brackwater scenario); the only conversion checked is 1 min = 60 s (SI).
 */
import { isActionFailure, isRedirect, type RequestEvent } from '@sveltejs/kit';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, ModelRevision, PlantModel, initModels } from '../../src/lib/server/db/models';
import { approve, createModel, createRevision, submitForReview, updateDraft } from '../../src/lib/server/revisions';
import { createApiToken, revokeApiToken, userForToken } from '../../src/lib/server/tokens';
import { GET as listModels } from '../../src/routes/api/v1/models/+server';
import { GET as getModel } from '../../src/routes/api/v1/models/[id]/+server';
import { GET as getAsset } from '../../src/routes/api/v1/assets/[id]/+server';
import { GET as exportJson } from '../../src/routes/(app)/models/[id=id]/export.json/+server';
import { GET as exportCsv } from '../../src/routes/(app)/models/[id=id]/export.csv/+server';
import { actions as newModelActions, load as newModelLoad } from '../../src/routes/(app)/models/new/+page.server';
import { actions as reviseActions, load as reviseLoad } from '../../src/routes/(app)/models/[id=id]/revise/+page.server';
import { closeTestDatabase, resetTestDatabase, useTestDatabaseEnv } from '../helpers/db';
import { RUN, fopdtInput, person, place, type Person } from '../helpers/workflow';

let engineer: Person;
let reviewer: Person;
let viewer: Person;
let areaId: number;
const tags: string[] = [];
const modelIds: number[] = [];
let approvedIds: number[] = [];
let minuteModel: { id: number; assetId: number; tag: string };

type SessionUser = NonNullable<App.Locals['user']>;
const userOf = (p: Person): SessionUser => ({ id: p.id, email: p.email, name: p.name, role: p.role, mustChangePassword: false });

/** The request event a route handler receives (only what these handlers read). */
function event(path: string, user: SessionUser | null, init: { params?: Record<string, string>; body?: FormData } = {}): RequestEvent {
	const url = new URL(`http://127.0.0.1${path}`);
	const request = new Request(url, init.body ? { method: 'POST', body: init.body } : undefined);
	return {
		url,
		request,
		params: init.params ?? {},
		locals: { user, authMethod: user ? 'session' : null },
		getClientAddress: () => '127.0.0.1',
		route: { id: null },
		setHeaders: () => {},
		cookies: { get: () => undefined }
	} as unknown as RequestEvent;
}

async function json(response: Response): Promise<{ status: number; body: Record<string, unknown> }> {
	return { status: response.status, body: (await response.json()) as Record<string, unknown> };
}

const list = async (query: string, who: Person | SessionUser = engineer) =>
	json(await listModels(event(`/api/v1/models${query}`, 'acting' in who ? userOf(who) : who) as never));

function form(values: Record<string, string>): FormData {
	const f = new FormData();
	for (const [k, v] of Object.entries(values)) f.set(k, v);
	return f;
}

async function counts() {
	return {
		models: await PlantModel.count(),
		revisions: await ModelRevision.count(),
		audits: await AuditEvent.count()
	};
}

/** The refusal a form action returned (fails the test when it returned something else). */
function failure(out: unknown): { status: number; data: Record<string, any> } {
	expect(isActionFailure(out)).toBe(true);
	return out as { status: number; data: Record<string, any> };
}

/** Runs a form action; a thrown redirect is returned as `{ redirect }`. */
async function runAction<T>(fn: () => Promise<T>): Promise<T | { redirect: { status: number; location: string } }> {
	try {
		return await fn();
	} catch (e) {
		if (isRedirect(e)) return { redirect: { status: e.status, location: e.location } };
		throw e;
	}
}

beforeAll(async () => {
	useTestDatabaseEnv();
	await resetTestDatabase();
	initModels();
	engineer = await person('priya', 'engineer');
	reviewer = await person('tomas', 'reviewer');
	viewer = await person('olu', 'viewer');
	({ areaId } = await place('API'));
	// 27 models on their own new assets: more than one page of 25.
	for (let i = 0; i < 27; i++) {
		const tag = `TIC-${String(4100 + i)}`;
		tags.push(tag);
		const { model } = await createModel(engineer.acting, {
			title: `Oven zone ${i + 1} temperature`,
			asset: { areaId, tag, kind: i % 3 === 0 ? 'oven' : 'pump', name: `Asset ${tag}`, description: null },
			revision: fopdtInput(i % 4 === 0 ? { structure: 'ipdt', k: 0.002, tau: null } : { k: 0.5 + i / 10 })
		});
		modelIds.push(model.id);
	}
	// Approve five of them (reviewer, four-eyes): the viewer sees only these.
	for (const id of modelIds.slice(0, 5)) {
		const rev = await ModelRevision.findOne({ where: { model_id: id } });
		await submitForReview(engineer.acting, Number(rev!.id));
		await approve(reviewer.acting, Number(rev!.id));
	}
	approvedIds = modelIds.slice(0, 5);
	// One model entered in minutes (τ = 3 min, θ = 0.5 min), approved, with a newer draft open.
	const { model, revision } = await createModel(engineer.acting, {
		title: 'Glycol chiller supply temperature',
		asset: { areaId, tag: `TT-${RUN.slice(-5).toUpperCase()}`, kind: 'chiller', name: 'Glycol chiller', description: null },
		revision: fopdtInput({ timeUnit: 'min', k: -0.4, tau: 3, theta: 0.5, mvUnit: '%', pvUnit: '°C', pvMin: -5, pvMax: 10, opPv: 2, validRange: null })
	});
	await submitForReview(engineer.acting, revision.id);
	await approve(reviewer.acting, revision.id);
	await createRevision(engineer.acting, model.id, fopdtInput({ timeUnit: 'min', k: -0.45, tau: 3.5, theta: 0.5, pvMin: -5, pvMax: 10, opPv: 2, changeSummary: 'Pump swapped.' }));
	minuteModel = { id: model.id, assetId: model.asset.id, tag: model.asset.tag };
});

afterAll(async () => {
	await closeTestDatabase();
});

describe('GET /api/v1/models', () => {
	it('pages the register 25 rows at a time with the total', async () => {
		const first = await list('');
		expect(first.status).toBe(200);
		expect(first.body.total).toBe(28);
		expect(first.body.pageSize).toBe(25);
		expect(first.body.pageCount).toBe(2);
		expect((first.body.models as unknown[]).length).toBe(25);
		const second = await list('?page=2');
		expect((second.body.models as unknown[]).length).toBe(3);
		const ids = [...(first.body.models as { id: number }[]), ...(second.body.models as { id: number }[])].map((m) => m.id);
		expect(new Set(ids).size).toBe(28);
	});

	it('filters by text over tag, asset name and title', async () => {
		const r = await list('?q=4105');
		expect((r.body.models as { asset: { tag: string } }[]).map((m) => m.asset.tag)).toEqual(['TIC-4105']);
		const byTitle = await list('?q=glycol%20chiller');
		expect((byTitle.body.models as { id: number }[]).map((m) => m.id)).toEqual([minuteModel.id]);
		const none = await list('?q=no%20such%20thing');
		expect(none.body.total).toBe(0);
		expect(none.body.models).toEqual([]);
	});

	it('filters by structure, kind and state, and sorts both ways', async () => {
		const ipdt = await list('?structure=ipdt');
		const expectedIpdt = tags.filter((_, i) => i % 4 === 0);
		expect((ipdt.body.models as { asset: { tag: string } }[]).map((m) => m.asset.tag)).toEqual(expectedIpdt);
		const ovens = await list('?kind=oven&sort=tag&dir=desc');
		const expectedOvens = tags.filter((_, i) => i % 3 === 0).sort().reverse();
		expect((ovens.body.models as { asset: { tag: string } }[]).map((m) => m.asset.tag)).toEqual(expectedOvens);
		const approved = await list('?state=approved');
		expect((approved.body.models as { id: number }[]).map((m) => m.id).sort((a, b) => a - b)).toEqual([...approvedIds, minuteModel.id]);
		expect(approved.body.query).toMatchObject({ state: 'approved', sort: 'tag', dir: 'asc', page: 1 });
	});

	it('answers 400 naming the first bad parameter', async () => {
		for (const [query, field] of [
			['?sort=colour', 'sort'],
			['?page=0', 'page'],
			['?structure=cubic', 'structure'],
			['?site=abc', 'site'],
			['?stale=yes', 'stale'],
			[`?q=${'x'.repeat(101)}`, 'q'],
			['?page=1&page=2', 'page']
		] as const) {
			const r = await list(query);
			expect(r.status, query).toBe(400);
			expect(r.body.error).toBe('bad_request');
			expect(r.body.field, query).toBe(field);
			expect(String(r.body.message)).toContain(field);
		}
	});

	it('shows a viewer approved models only', async () => {
		const r = await list('', viewer);
		expect((r.body.models as { id: number }[]).map((m) => m.id).sort((a, b) => a - b)).toEqual([...approvedIds, minuteModel.id]);
	});

	it('works with an API token resolved as the hooks do, and stops when it is revoked', async () => {
		const { token, dto } = await createApiToken({ ...userOf(viewer) }, { name: 'register export', lifetimeDays: 1 });
		const user = await userForToken(token);
		expect(user?.id).toBe(viewer.id);
		const r = await list('?sort=gain&dir=desc', user!);
		expect(r.status).toBe(200);
		expect(r.body.total).toBe(6);
		await revokeApiToken(userOf(viewer), dto.id);
		expect(await userForToken(token)).toBeNull();
	});

	it('answers 401 JSON when nobody is signed in (hooks answer first in the app; the handler is safe alone)', async () => {
		const r = await json(await listModels(event('/api/v1/models', null) as never));
		expect(r.status).toBe(401);
		expect(r.body.error).toBe('unauthenticated');
	});
});

describe('GET /api/v1/models/:id', () => {
	const get = async (id: string, who: Person) => json(await getModel(event(`/api/v1/models/${id}`, userOf(who), { params: { id } }) as never));

	it('gives the approved revision with its facts in seconds and in the display unit (1 min = 60 s)', async () => {
		const r = await get(String(minuteModel.id), viewer);
		expect(r.status).toBe(200);
		const rev = r.body.revision as Record<string, any>;
		expect(rev.state).toBe('approved');
		expect(rev.timeUnit).toBe('min');
		expect(rev.parametersSeconds).toEqual({ k: -0.4, tau: 180, theta: 30 });
		expect(rev.parametersInTimeUnit).toEqual({ k: -0.4, tau: 3, theta: 0.5 });
		expect(rev.transferFunction).toEqual({ num: [-0.4], den: [180, 1], delaySeconds: 30 });
		expect(rev.pv).toEqual({ name: 'Relative humidity', unit: '°C', min: -5, max: 10 });
		expect(r.body.openRevision).toBeNull();
		expect(r.body.asset).toMatchObject({ id: minuteModel.assetId, tag: minuteModel.tag });
	});

	it('shows an engineer the open draft with its version, and the history', async () => {
		const r = await get(String(minuteModel.id), engineer);
		const open = r.body.openRevision as Record<string, any>;
		expect(open.state).toBe('draft');
		expect(open.no).toBe(2);
		expect(open.parametersSeconds).toEqual({ k: -0.45, tau: 210, theta: 30 });
		expect(typeof open.version).toBe('number');
		expect((r.body.history as { no: number }[]).map((h) => h.no)).toEqual([2, 1]);
	});

	it('hides a never-approved model from a viewer as if it did not exist', async () => {
		const draftOnly = modelIds[10];
		const asViewer = await get(String(draftOnly), viewer);
		expect(asViewer.status).toBe(404);
		expect(asViewer.body.error).toBe('not_found');
		const asEngineer = await get(String(draftOnly), engineer);
		expect(asEngineer.status).toBe(200);
		expect((asEngineer.body.revision as { state: string }).state).toBe('draft');
		expect((asEngineer.body.model as { isApproved: boolean }).isApproved).toBe(false);
	});

	it('answers 404 JSON for a missing model and 400 for an id that is not one', async () => {
		const missing = await get('999999', engineer);
		expect(missing).toEqual({ status: 404, body: { error: 'not_found', message: 'There is no model with this id.', field: null } });
		for (const bad of ['abc', '0', '-3', '1.5', '99999999999']) {
			const r = await get(bad, engineer);
			expect(r.status, bad).toBe(400);
			expect(r.body.field).toBe('id');
		}
	});
});

describe('GET /api/v1/assets/:id', () => {
	const get = async (id: string, who: Person) => json(await getAsset(event(`/api/v1/assets/${id}`, userOf(who), { params: { id } }) as never));

	it('gives the asset with its models', async () => {
		const r = await get(String(minuteModel.assetId), viewer);
		expect(r.status).toBe(200);
		expect(r.body).toMatchObject({ id: minuteModel.assetId, tag: minuteModel.tag, kind: 'chiller' });
		expect((r.body.models as { id: number }[]).map((m) => m.id)).toEqual([minuteModel.id]);
	});

	it('answers 404 JSON for a missing asset and 400 for a bad id', async () => {
		const missing = await get('987654', engineer);
		expect(missing.status).toBe(404);
		expect(missing.body.error).toBe('not_found');
		expect((await get('x1', engineer)).status).toBe(400);
	});
});

describe('export files', () => {
	it('exports JSON with the approved content only, named after the asset tag', async () => {
		const res = await exportJson(event(`/models/${minuteModel.id}/export.json`, userOf(engineer), { params: { id: String(minuteModel.id) } }) as never);
		expect(res.headers.get('content-disposition')).toBe(`attachment; filename="${minuteModel.tag}_model-${minuteModel.id}_rev-1.json"`);
		const doc = (await res.json()) as Record<string, any>;
		expect(doc.format).toBe('loopledger.model/1');
		expect(doc.revision.no).toBe(1);
		expect(doc.openRevision).toBeNull();
		expect(doc.history).toEqual([]);
		expect(doc.caution).toMatch(/site procedures/);
	});

	it('exports CSV with one row per fact', async () => {
		const res = await exportCsv(event(`/models/${minuteModel.id}/export.csv`, userOf(viewer), { params: { id: String(minuteModel.id) } }) as never);
		expect(res.headers.get('content-type')).toBe('text/csv; charset=utf-8');
		const text = (await res.text()).replace(/^\uFEFF/, '');
		const rows = Papa.parse<string[]>(text, { skipEmptyLines: true }).data;
		expect(rows[0]).toEqual(['section', 'item', 'value', 'unit', 'note']);
		expect(rows.find((r) => r[0] === 'parameter' && r[1] === 'tau')).toEqual(['parameter', 'tau', '180', 's', '3 min']);
	});

	it('refuses a viewer the export of a never-approved model (404)', async () => {
		const id = String(modelIds[10]);
		await expect(exportJson(event(`/models/${id}/export.json`, userOf(viewer), { params: { id } }) as never)).rejects.toMatchObject({ status: 404 });
	});
});

describe('the model form actions', () => {
	const base = {
		assetMode: 'existing',
		title: 'Proofer 3 humidity from steam valve',
		mvName: 'Steam valve',
		mvUnit: '%',
		mvMin: '0',
		mvMax: '100',
		pvName: 'Relative humidity',
		pvUnit: '%RH',
		pvMin: '40',
		pvMax: '95',
		structure: 'fopdt',
		timeUnit: 's',
		k: '0.6',
		tau: '45',
		theta: '12',
		method: 'step_test',
		changeSummary: 'First identification from the bump test.'
	};

	it('stores nothing when a field is invalid, and answers 400 with the message under the field and the values kept', async () => {
		const before = await counts();
		const out = await newModelActions.save(event('/models/new?/save', userOf(engineer), { body: form({ ...base, assetId: String(minuteModel.assetId), tau: '-5', fitR2: 'high' }) }) as never);
		const { status, data } = failure(out);
		expect(status).toBe(400);
		expect(data.errors.tau).toBe('Time constant τ must be greater than zero.');
		expect(data.errors.fitR2).toBe('Fit R²: enter a number.');
		expect(data.values.tau).toBe('-5');
		expect(data.values.title).toBe(base.title);
		expect(await counts()).toEqual(before);
	});

	it('creates the model with a draft revision and its audit event, then redirects to it', async () => {
		const before = await counts();
		const out = await runAction(() =>
			newModelActions.save(event('/models/new?/save', userOf(engineer), { body: form({ ...base, assetId: String(minuteModel.assetId) }) }) as never)
		);
		expect(out).toHaveProperty('redirect');
		const { status, location } = (out as { redirect: { status: number; location: string } }).redirect;
		expect(status).toBe(303);
		const id = Number(/^\/models\/(\d+)$/.exec(location)?.[1]);
		const model = await PlantModel.findByPk(id);
		expect(model?.title).toBe(base.title);
		expect(model?.status).toBe('draft');
		const revisions = await ModelRevision.findAll({ where: { model_id: id } });
		expect(revisions.map((r) => [r.state, Number(r.author_id), r.structure])).toEqual([['draft', engineer.id, 'fopdt']]);
		const audit = await AuditEvent.findAll({ where: { entity_type: 'plant_model', entity_id: String(id) } });
		expect(audit.map((a) => [a.action, Number(a.actor_id)])).toEqual([['model.create', engineer.id]]);
		const after = await counts();
		expect(after).toEqual({ models: before.models + 1, revisions: before.revisions + 1, audits: before.audits + 1 });
	});

	it('creates a new asset inline, and refuses a tag already on that site (422 under the tag) without storing anything', async () => {
		const fresh = { ...base, assetMode: 'new', newAssetAreaId: String(areaId), newAssetTag: `pic-${RUN.slice(-4)}`, newAssetKind: 'boiler', newAssetName: 'Steam header' };
		const ok = await runAction(() => newModelActions.save(event('/models/new?/save', userOf(engineer), { body: form(fresh) }) as never));
		expect(ok).toHaveProperty('redirect');
		const before = await counts();
		const again = await newModelActions.save(event('/models/new?/save', userOf(engineer), { body: form(fresh) }) as never);
		const { status, data } = failure(again);
		expect(status).toBe(422);
		expect(data.errors.newAssetTag).toMatch(/already exists/);
		expect(data.values.newAssetName).toBe('Steam header');
		expect(await counts()).toEqual(before);
	});

	it('refuses a viewer: the page answers 403 and the action stores nothing', async () => {
		await expect(newModelLoad(event('/models/new', userOf(viewer)) as never)).rejects.toMatchObject({ status: 403 });
		const before = await counts();
		const out = await newModelActions.save(event('/models/new?/save', userOf(viewer), { body: form({ ...base, assetId: String(minuteModel.assetId) }) }) as never);
		expect(failure(out).status).toBe(403);
		expect(await counts()).toEqual(before);
	});

	it('edits the open draft; a save based on an older version is a 409 with the stored values, and nothing changes', async () => {
		const load = (await reviseLoad(event(`/models/${minuteModel.id}/revise`, userOf(engineer), { params: { id: String(minuteModel.id) } }) as never)) as Record<string, any>;
		expect(load.mode).toBe('edit');
		expect(load.initial.tau).toBe('3.5');
		const staleVersion = String(load.version);
		const draft = await ModelRevision.findOne({ where: { model_id: minuteModel.id, state: 'draft' } });
		// Someone else saves the draft first (through the service).
		const other = await person('marek', 'engineer');
		await updateDraft(other.acting, Number(draft!.id), Number(load.version), fopdtInput({ timeUnit: 'min', k: -0.5, tau: 3.5, theta: 0.5, pvMin: -5, pvMax: 10, opPv: 2, changeSummary: 'Pump swapped; gain re-read.' }));
		const stored = await ModelRevision.findByPk(Number(draft!.id));
		const before = await counts();
		const mine = { ...load.initial, k: '-0.42', version: staleVersion };
		const out = await reviseActions.save(event(`/models/${minuteModel.id}/revise?/save`, userOf(engineer), { params: { id: String(minuteModel.id) }, body: form(mine) }) as never);
		const refused = failure(out);
		expect(refused.status).toBe(409);
		expect(refused.data.values.k).toBe('-0.42');
		expect(refused.data.conflict.stored.k).toBe('-0.5');
		expect(refused.data.conflict.version).toBe(Number(stored!.version));
		expect(refused.data.conflict.updatedBy).toBe(other.name);
		expect(await counts()).toEqual(before);
		const unchanged = await ModelRevision.findByPk(Number(draft!.id));
		expect([Number(unchanged!.gain), Number(unchanged!.version)]).toEqual([-0.5, Number(stored!.version)]);
		// Saving again on the stored version goes through and writes one audit event.
		const retry = await runAction(() =>
			reviseActions.save(
				event(`/models/${minuteModel.id}/revise?/save`, userOf(engineer), { params: { id: String(minuteModel.id) }, body: form({ ...mine, version: String(stored!.version) }) }) as never
			)
		);
		expect(retry).toEqual({ redirect: { status: 303, location: `/models/${minuteModel.id}` } });
		expect(Number((await ModelRevision.findByPk(Number(draft!.id)))!.gain)).toBe(-0.42);
		expect((await counts()).audits).toBe(before.audits + 1);
	});

	it('starts a new draft revision from the approved one when none is open', async () => {
		const id = approvedIds[1];
		const load = (await reviseLoad(event(`/models/${id}/revise`, userOf(engineer), { params: { id: String(id) } }) as never)) as Record<string, any>;
		expect(load.mode).toBe('revise');
		expect(load.initial.changeSummary).toBe('');
		const out = await runAction(() =>
			reviseActions.save(event(`/models/${id}/revise?/save`, userOf(engineer), { params: { id: String(id) }, body: form({ ...load.initial, tau: '200', changeSummary: 'Slower after insulation work.' }) }) as never)
		);
		expect(out).toEqual({ redirect: { status: 303, location: `/models/${id}` } });
		const revs = await ModelRevision.findAll({ where: { model_id: id }, order: [['revision_no', 'ASC']] });
		expect(revs.map((r) => [r.revision_no, r.state])).toEqual([
			[1, 'approved'],
			[2, 'draft']
		]);
		expect(Number(revs[1].time_constant_s)).toBe(200);
	});
});
