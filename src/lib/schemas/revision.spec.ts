/**
 * The revision input schemas: form strings and JSON numbers, structure-specific fields, messages
 * naming the field, and the cross-field rules (spans min < max, operating point in span, R² in
 * [0, 1], RMS ≥ 0, proper rational models, dates).
 */
import { describe, expect, it } from 'vitest';
import {
	approveSchema,
	fieldErrors,
	formValues,
	modelCreateSchema,
	requestChangesSchema,
	revalidateSchema,
	revisionEditSchema,
	revisionSchema,
	withdrawSchema
} from './revision';

const NOW = () => new Date('2026-12-01T12:00:00Z');

/** A valid FOPDT revision as an HTML form posts it (all strings). */
const FORM = {
	structure: 'fopdt',
	k: '0.42',
	tau: '8',
	theta: '0.75',
	timeUnit: 'min',
	mvName: 'Steam coil valve',
	mvUnit: '%',
	mvMin: '0',
	mvMax: '100',
	pvName: 'Proofer air temperature',
	pvUnit: '°C',
	pvMin: '20',
	pvMax: '45',
	opMv: '38',
	opPv: '36',
	opNote: 'Loaded with 600 g tins',
	method: 'step_test',
	testDate: '2026-05-15',
	fitR2: '0.962',
	fitRmse: '0.18',
	validRange: 'Valve 25–55 %',
	revalidateBy: '2027-05-15',
	changeSummary: 'First identification.'
};

function errorsOf(input: Record<string, unknown>) {
	const r = revisionSchema(NOW).safeParse(input);
	expect(r.success).toBe(false);
	return r.success ? {} : fieldErrors(r.error);
}

describe('revisionSchema', () => {
	it('parses a form post into numbers, keeping only the structure’s parameters', () => {
		const r = revisionSchema(NOW).parse({ ...FORM, tau2: '5', zeta: '0.3' });
		expect(r).toMatchObject({ structure: 'fopdt', sopdtForm: null, k: 0.42, tau: 8, theta: 0.75, tau2: null, zeta: null, wn: null, num: null });
		expect(r).toMatchObject({ timeUnit: 'min', mvMin: 0, mvMax: 100, opMv: 38, fitR2: 0.962, testDate: '2026-05-15' });
	});

	it('accepts JSON numbers as well', () => {
		const r = revisionSchema(NOW).parse({ ...FORM, k: 0.42, tau: 8, mvMin: 0, mvMax: 100, pvMin: 20, pvMax: 45, opMv: 38, opPv: 36, fitR2: 0.962, fitRmse: 0.18 });
		expect(r.k).toBe(0.42);
	});

	it('empty optional fields become null; dead time defaults to 0', () => {
		const r = revisionSchema(NOW).parse({ ...FORM, theta: '', opMv: '', opPv: '', opNote: ' ', fitR2: '', fitRmse: '', testDate: '', revalidateBy: '' });
		expect(r).toMatchObject({ theta: 0, opMv: null, opPv: null, opNote: null, fitR2: null, testDate: null, revalidateBy: null });
	});

	it('names the field in every message', () => {
		const e = errorsOf({ ...FORM, k: 'abc', tau: '-3', mvName: '', fitR2: '1.5', fitRmse: '-1', method: 'guess' });
		expect(e.k).toBe('Gain K: enter a number.');
		expect(e.tau).toBe('Time constant τ must be greater than zero.');
		expect(e.mvName).toBe('MV name: enter a value.');
		expect(e.fitR2).toBe('Fit R² must be between 0 and 1.');
		expect(e.fitRmse).toBe('Fit RMS error must be zero or positive.');
		expect(e.method).toMatch(/^Identification method: choose/);
	});

	it('reports every bad field at once (the form shows them all)', () => {
		const e = errorsOf({ ...FORM, k: '', mvMax: '0', pvUnit: '' });
		expect(Object.keys(e).sort()).toEqual(['k', 'mvMax', 'pvUnit']);
		expect(e.k).toBe('Gain K: enter a value.');
		expect(e.mvMax).toBe('MV span maximum must be greater than the minimum.');
	});

	it('a zero gain is refused', () => {
		expect(errorsOf({ ...FORM, k: '0' }).k).toBe('Gain K must not be zero.');
	});

	it('spans: min < max; the operating point lies within the span', () => {
		const e = errorsOf({ ...FORM, pvMin: '50', pvMax: '45', opMv: '120' });
		expect(e.pvMax).toBe('PV span maximum must be greater than the minimum.');
		expect(e.opMv).toBe('Operating point MV must lie within the MV span.');
	});

	it('SOPDT by time constants needs τ and τ2; by damping needs ζ and ωn', () => {
		expect(Object.keys(errorsOf({ ...FORM, structure: 'sopdt', tau: '' })).sort()).toEqual(['tau', 'tau2']);
		const damped = revisionSchema(NOW).parse({ ...FORM, structure: 'sopdt', sopdtForm: 'damping', zeta: '0.6', wn: '0.8' });
		expect(damped).toMatchObject({ sopdtForm: 'damping', zeta: 0.6, wn: 0.8, tau: null, tau2: null, theta: 0.75 });
		expect(Object.keys(errorsOf({ ...FORM, structure: 'sopdt', sopdtForm: 'damping' })).sort()).toEqual(['wn', 'zeta']);
	});

	it('IPDT names its gain Kv', () => {
		expect(errorsOf({ ...FORM, structure: 'ipdt', k: '' }).k).toBe('Integrating gain Kv: enter a value.');
	});

	it('a standard second-order model has no dead time', () => {
		const e = errorsOf({ ...FORM, structure: 'second_order', zeta: '0.5', wn: '2', theta: '3' });
		expect(e.theta).toMatch(/no dead time/);
		const ok = revisionSchema(NOW).parse({ ...FORM, structure: 'second_order', zeta: '0.5', wn: '2', theta: '' });
		expect(ok.theta).toBeNull();
	});

	it('rational: coefficients as text or arrays, leading zeros dropped, must be proper', () => {
		const r = revisionSchema(NOW).parse({ ...FORM, structure: 'rational', num: '0.2, 0.48', den: [0, 5.3, 54.7, 118, 1], theta: '0.2' });
		expect(r).toMatchObject({ num: [0.2, 0.48], den: [5.3, 54.7, 118, 1], theta: 0.2, k: null, tau: null });
		expect(errorsOf({ ...FORM, structure: 'rational', num: '1 2 3', den: '1 1' }).num).toMatch(/numerator order may not exceed/);
		expect(errorsOf({ ...FORM, structure: 'rational', num: '1', den: '0 0' }).den).toMatch(/at least one coefficient must be non-zero/);
		expect(errorsOf({ ...FORM, structure: 'rational', num: '1, x', den: '1 1' }).num).toMatch(/every coefficient must be a number/);
		expect(errorsOf({ ...FORM, structure: 'rational', num: '', den: '1 1' }).num).toMatch(/enter at least one coefficient/);
	});

	it('dates: real calendar dates, test date not in the future, revalidate-by after the test date', () => {
		expect(errorsOf({ ...FORM, testDate: '2026-02-30' }).testDate).toMatch(/real date/);
		expect(errorsOf({ ...FORM, testDate: '2026-12-05' }).testDate).toBe('Test date cannot be in the future.');
		expect(errorsOf({ ...FORM, revalidateBy: '2026-05-15' }).revalidateBy).toBe('Revalidate by must be after the test date.');
	});

	it('single-line fields refuse line breaks; the change summary keeps them', () => {
		expect(errorsOf({ ...FORM, mvUnit: '%\nbad' }).mvUnit).toMatch(/single line/);
		expect(revisionSchema(NOW).parse({ ...FORM, changeSummary: 'Line one\r\nLine two' }).changeSummary).toBe('Line one\nLine two');
	});

	it('parses FormData through formValues', () => {
		const fd = new FormData();
		for (const [k, v] of Object.entries(FORM)) fd.set(k, v);
		expect(revisionSchema(NOW).parse(formValues(fd)).tau).toBe(8);
	});
});

describe('modelCreateSchema', () => {
	it('an existing asset by id', () => {
		const r = modelCreateSchema(NOW).parse({ ...FORM, title: 'Proofer 1 air temperature', assetId: '7' });
		expect(r.asset).toEqual({ id: 7 });
		expect(r.revision.k).toBe(0.42);
	});
	it('a new asset: tag upper-cased, every field named when missing', () => {
		const r = modelCreateSchema(NOW).parse({
			...FORM,
			title: 'New oven zone',
			newAssetAreaId: '3',
			newAssetTag: 'tic-2107',
			newAssetKind: 'oven',
			newAssetName: 'Zone 4 burner'
		});
		expect(r.asset).toEqual({ areaId: 3, tag: 'TIC-2107', kind: 'oven', name: 'Zone 4 burner', description: null });
		const bad = modelCreateSchema(NOW).safeParse({ ...FORM, title: 'x', newAssetTag: 'bad tag!' });
		expect(bad.success).toBe(false);
		if (!bad.success) {
			const e = fieldErrors(bad.error);
			expect(Object.keys(e).sort()).toEqual(['newAssetAreaId', 'newAssetKind', 'newAssetName', 'newAssetTag']);
		}
	});
	it('neither: the asset field says what to do', () => {
		const bad = modelCreateSchema(NOW).safeParse({ ...FORM, title: 'x' });
		expect(bad.success).toBe(false);
		if (!bad.success) expect(fieldErrors(bad.error).assetId).toBe('Asset: choose an asset, or describe a new one.');
	});
	it('a title is required', () => {
		const bad = modelCreateSchema(NOW).safeParse({ ...FORM, assetId: '1' });
		expect(bad.success).toBe(false);
		if (!bad.success) expect(fieldErrors(bad.error).title).toBe('Model title: enter a value.');
	});
});

describe('edit and review action schemas', () => {
	it('the edit form carries the version it started from', () => {
		expect(revisionEditSchema(NOW).parse({ ...FORM, version: '3' }).version).toBe(3);
		const bad = revisionEditSchema(NOW).safeParse({ ...FORM });
		expect(bad.success).toBe(false);
		if (!bad.success) expect(fieldErrors(bad.error).version).toMatch(/reload the page/);
	});
	it('approve: comment optional; send back: comment required; withdraw: reason required', () => {
		expect(approveSchema.parse({ comment: '' })).toEqual({ comment: undefined, version: undefined });
		const rc = requestChangesSchema.safeParse({ comment: '  ' });
		expect(rc.success).toBe(false);
		if (!rc.success) expect(fieldErrors(rc.error).comment).toBe('Review comment: enter a value.');
		const w = withdrawSchema.safeParse({});
		expect(w.success).toBe(false);
		if (!w.success) expect(fieldErrors(w.error).reason).toBe('Reason: enter a value.');
	});
	it('revalidate needs a real date', () => {
		expect(revalidateSchema.parse({ revalidateBy: '2027-06-30' }).revalidateBy).toBe('2027-06-30');
		const bad = revalidateSchema.safeParse({ revalidateBy: '30/06/2027' });
		expect(bad.success).toBe(false);
		if (!bad.success) expect(fieldErrors(bad.error).revalidateBy).toMatch(/YYYY-MM-DD/);
	});
});
