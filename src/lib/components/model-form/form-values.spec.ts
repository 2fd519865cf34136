/**
 * The model form's values: which fields are sent for the chosen structure and asset choice, that
 * the browser's checks are the server's (same schema, same messages), and the table shown when a
 * draft changed under the editor. No numeric computation here beyond the unit rule 1 min = 60 s.
 */
import { describe, expect, it } from 'vitest';
import { modelCreateSchema, revisionSchema } from '../../schemas/revision';
import { conflictRows, fieldLabel, NEW_MODEL_DEFAULTS, parameterFieldsOf, submittedValues, toFormStrings, validateForm, type FormStrings } from './form-values';

const NOW = () => new Date('2026-03-20T12:00:00Z');

/** A complete, valid new FOPDT model on an existing asset (demo-like invented values). */
const valid: FormStrings = {
	...NEW_MODEL_DEFAULTS,
	title: 'Proofer 3 humidity from steam valve',
	assetId: '4',
	mvName: 'Steam valve',
	mvUnit: '%',
	mvMin: '0',
	mvMax: '100',
	pvName: 'Relative humidity',
	pvUnit: '%RH',
	pvMin: '40',
	pvMax: '95',
	k: '0.6',
	tau: '45',
	theta: '12',
	testDate: '2026-03-03',
	revalidateBy: '2027-03-03',
	changeSummary: 'First identification from the bump test of 3 March.'
};

describe('validateForm', () => {
	it('accepts a complete new model', () => {
		expect(validateForm('create', valid, NOW)).toEqual({});
	});
	it('puts each message under its field, the same message the server gives', () => {
		const bad = { ...valid, tau: '-5', mvMax: '0', fitR2: '1.2', title: '' };
		const errors = validateForm('create', bad, NOW);
		expect(errors.tau).toBe('Time constant τ must be greater than zero.');
		expect(errors.mvMax).toBe('MV span maximum must be greater than the minimum.');
		expect(errors.fitR2).toBe('Fit R² must be between 0 and 1.');
		expect(errors.title).toBe('Model title: enter a value.');
		const server = modelCreateSchema(NOW).safeParse(submittedValues('create', bad));
		expect(server.success).toBe(false);
		if (!server.success) {
			const first = new Map<string, string>();
			for (const i of server.error.issues) if (!first.has(String(i.path[0]))) first.set(String(i.path[0]), i.message);
			expect(Object.fromEntries(first)).toEqual(errors);
		}
	});
	it('rejects text where a number belongs, naming the field', () => {
		expect(validateForm('create', { ...valid, k: 'abc' }, NOW).k).toBe('Gain K: enter a number.');
	});
	it('requires the version of the draft when editing', () => {
		const { title: _t, assetId: _a, assetMode: _m, ...revision } = valid;
		expect(validateForm('edit', revision, NOW).version).toMatch(/reload the page/);
		expect(validateForm('edit', { ...revision, version: '3' }, NOW)).toEqual({});
	});
});

describe('submittedValues', () => {
	it('sends only the parameters of the chosen structure (switching back keeps the others in the form)', () => {
		const ipdt = { ...valid, structure: 'ipdt', k: '0.02', tau: '-5', tau2: 'junk' };
		const sent = submittedValues('create', ipdt);
		expect(sent.tau).toBeUndefined();
		expect(sent.tau2).toBeUndefined();
		expect(sent.k).toBe('0.02');
		expect(validateForm('create', ipdt, NOW)).toEqual({});
	});
	it('uses an existing asset or the new asset fields, never both', () => {
		const existing = submittedValues('create', { ...valid, newAssetTag: 'TIC-1', newAssetName: 'x' });
		expect(existing.assetId).toBe('4');
		expect(existing.newAssetTag).toBeUndefined();
		const fresh = submittedValues('create', { ...valid, assetMode: 'new', newAssetAreaId: '2', newAssetTag: 'tic-9901', newAssetKind: 'oven', newAssetName: 'Test oven' });
		expect(fresh.assetId).toBeUndefined();
		const parsed = modelCreateSchema(NOW).parse(fresh);
		expect(parsed.asset).toEqual({ areaId: 2, tag: 'TIC-9901', kind: 'oven', name: 'Test oven', description: null });
	});
	it('drops the title and asset fields from a revision', () => {
		const sent = submittedValues('revise', valid);
		expect(sent.title).toBeUndefined();
		expect(sent.assetId).toBeUndefined();
		expect(revisionSchema(NOW).safeParse(sent).success).toBe(true);
	});
});

describe('parameterFieldsOf', () => {
	it('lists the fields of each structure', () => {
		expect(parameterFieldsOf({ structure: 'fopdt' })).toEqual(['k', 'tau', 'theta']);
		expect(parameterFieldsOf({ structure: 'sopdt', sopdtForm: 'time_constants' })).toEqual(['k', 'tau', 'tau2', 'theta']);
		expect(parameterFieldsOf({ structure: 'sopdt', sopdtForm: 'damping' })).toEqual(['k', 'zeta', 'wn', 'theta']);
		expect(parameterFieldsOf({ structure: 'ipdt' })).toEqual(['k', 'theta']);
		expect(parameterFieldsOf({ structure: 'second_order' })).toEqual(['k', 'zeta', 'wn']);
		expect(parameterFieldsOf({ structure: 'rational' })).toEqual(['theta', 'num', 'den']);
	});
});

describe('toFormStrings', () => {
	it('writes numbers as typed, empty for null, coefficients comma-separated', () => {
		const parsed = revisionSchema(NOW).parse({ ...submittedValues('revise', valid), structure: 'rational', num: '-4 1', den: '50;15;1', theta: '' });
		const strings = toFormStrings(parsed);
		expect(strings.num).toBe('-4, 1');
		expect(strings.den).toBe('50, 15, 1');
		expect(strings.theta).toBe('0');
		expect(strings.opMv).toBe('');
		expect(revisionSchema(NOW).parse(strings)).toEqual(parsed);
	});
});

describe('conflictRows', () => {
	it('lists the fields that differ, in form order, ignoring how a number is written', () => {
		const stored = { ...valid, k: '0.60', theta: '2', changeSummary: 'Edited by a colleague.' };
		const rows = conflictRows(stored, valid);
		expect(rows.map((r) => r.field)).toEqual(['theta', 'changeSummary']);
		expect(rows[0]).toEqual({ field: 'theta', label: 'Dead time θ', stored: '2', yours: '12' });
	});
	it('shows parameters of both structures when the structure changed', () => {
		const stored = { ...valid, structure: 'ipdt', k: '0.02', tau: '' };
		const rows = conflictRows(stored, valid).map((r) => r.field);
		expect(rows).toEqual(['structure', 'k', 'tau']);
	});
	it('calls K of an integrating model its integrating gain', () => {
		expect(fieldLabel('k', { structure: 'ipdt' })).toBe('Integrating gain Kv');
		expect(fieldLabel('k', { structure: 'fopdt' })).toBe('Gain K');
	});
});
