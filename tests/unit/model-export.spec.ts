/**
 * The model export files: the CSV layout (`section,item,value,unit,note`, RFC 4180 quoting, CRLF),
 * read back with papaparse; the guard against spreadsheet formulas (OWASP "CSV Injection", common
 * practice); file names from the asset tag. The document is invented demo data of the Brackwater
 * scenario; the only conversion checked is 1 min = 60 s (SI).
 */
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { CSV_COLUMNS, EXPORT_CAUTION, exportFilename, MODEL_DOCUMENT_FORMAT, modelCsv, type ModelDocument } from '../../src/lib/server/export';

function doc(overrides: Partial<ModelDocument> = {}): ModelDocument {
	return {
		format: MODEL_DOCUMENT_FORMAT,
		exportedAt: '2026-03-20T12:00:00.000Z',
		model: { id: 12, title: 'Deck oven 2 hearth temperature from heater power', status: 'active', withdrawn: null, isApproved: true, stale: false },
		asset: { id: 7, tag: 'TIC-2201', name: 'Deck oven 2 hearth heaters', kind: 'oven' },
		site: { id: 1, code: 'BKY', name: 'Brackwater Bakery — Tallowgate' },
		area: { id: 2, code: 'OVN', name: 'Ovens' },
		revision: {
			id: 31,
			no: 3,
			state: 'approved',
			structure: 'fopdt',
			structureName: 'First order + dead time',
			parametersSeconds: { k: 3.2, tau: 900, theta: 90 },
			parametersInTimeUnit: { k: 3.2, tau: 15, theta: 1.5 },
			transferFunction: { num: [3.2], den: [900, 1], delaySeconds: 90 },
			gain: 3.2,
			timeConstantSeconds: 900,
			timeUnit: 'min',
			mv: { name: 'Thyristor power', unit: '%', min: 0, max: 100 },
			pv: { name: 'Hearth temperature', unit: '°C', min: 100, max: 320 },
			operatingPoint: { mv: 60, pv: 250, note: 'Empty hearth, doors shut.' },
			provenance: {
				method: 'two_point',
				methodName: 'Two-point method',
				testDate: '2025-10-07',
				dataFile: null,
				fitR2: null,
				fitRmse: null,
				validRange: 'Power 45–75 %, 230–270 °C',
				revalidateBy: '2026-10-17'
			},
			changeSummary: 'Re-identified after the "burner" service.',
			author: { id: 2, name: 'Priya Nair' },
			reviewer: { id: 4, name: 'Tomas Lindqvist' },
			submittedAt: '2025-10-13T08:00:00.000Z',
			reviewedAt: '2025-10-15T08:00:00.000Z',
			approvedAt: '2025-10-15T08:00:00.000Z'
		},
		openRevision: null,
		history: [],
		tuningSets: [
			{
				id: 5,
				loopTag: 'TIC-2201',
				state: 'approved',
				revisionNo: 3,
				controllerType: 'PI',
				form: 'ideal',
				kp: 1.4,
				tiSeconds: 600,
				tdSeconds: null,
				filterN: null,
				weightB: null,
				weightC: null,
				rule: 'simc',
				ruleParameter: 90,
				predicted: { overshootPercent: 4.1, settlingTime: 2400, gainMargin: null },
				notes: null,
				author: 'Priya Nair',
				approvedAt: '2025-11-02T08:00:00.000Z'
			}
		],
		caution: EXPORT_CAUTION,
		...overrides
	};
}

function rows(csv: string): string[][] {
	const parsed = Papa.parse<string[]>(csv, { skipEmptyLines: true });
	expect(parsed.errors).toEqual([]);
	return parsed.data;
}
const find = (table: string[][], section: string, item: string) => table.find((r) => r[0] === section && r[1] === item);

describe('modelCsv', () => {
	it('starts with the documented header and ends every line with CRLF', () => {
		const csv = modelCsv(doc());
		expect(csv.split('\r\n')[0]).toBe(CSV_COLUMNS.join(','));
		expect(csv.replace(/\r\n/g, '')).not.toMatch(/\n/);
		for (const r of rows(csv)) expect(r).toHaveLength(CSV_COLUMNS.length);
	});

	it('has one row per parameter in seconds, with the display-unit value in the note (1 min = 60 s)', () => {
		const t = rows(modelCsv(doc()));
		expect(find(t, 'parameter', 'tau')).toEqual(['parameter', 'tau', '900', 's', '15 min']);
		expect(find(t, 'parameter', 'theta')).toEqual(['parameter', 'theta', '90', 's', '1.5 min']);
		expect(find(t, 'parameter', 'k')?.slice(0, 4)).toEqual(['parameter', 'k', '3.2', '°C/%']);
	});

	it('lists the transfer function coefficients in descending powers of s and the delay', () => {
		const t = rows(modelCsv(doc()));
		expect(find(t, 'transfer function', 'num[0]')?.slice(2)).toEqual(['3.2', '', 'coefficient of s^0']);
		expect(find(t, 'transfer function', 'den[0]')?.slice(2)).toEqual(['900', '', 'coefficient of s^1']);
		expect(find(t, 'transfer function', 'den[1]')?.slice(2)).toEqual(['1', '', 'coefficient of s^0']);
		expect(find(t, 'transfer function', 'delay')?.slice(2, 4)).toEqual(['90', 's']);
	});

	it('keeps commas and quotes inside cells (RFC 4180) and writes empty cells for missing values, never NaN', () => {
		const csv = modelCsv(doc());
		const t = rows(csv);
		expect(find(t, 'provenance', 'valid range')?.[2]).toBe('Power 45–75 %, 230–270 °C');
		expect(find(t, 'approval', 'change summary')?.[2]).toBe('Re-identified after the "burner" service.');
		expect(find(t, 'provenance', 'fit R2')?.[2]).toBe('');
		expect(find(t, 'tuning set TIC-2201', 'predicted gainMargin')?.[2]).toBe('');
		expect(find(t, 'tuning set TIC-2201', 'ti')?.slice(2, 4)).toEqual(['600', 's']);
		expect(csv).not.toMatch(/NaN|Infinity/);
		expect(find(t, 'caution', 'caution')?.[2]).toBe(EXPORT_CAUTION);
	});

	it('defuses text that a spreadsheet would run as a formula, and leaves numbers alone', () => {
		const evil = doc({
			model: { ...doc().model, title: '=HYPERLINK("http://example.invalid","x")' },
			revision: { ...doc().revision, operatingPoint: { mv: -5, pv: 250, note: '@SUM(A1:A2)' } }
		});
		const t = rows(modelCsv(evil));
		expect(find(t, 'model', 'title')?.[2]).toBe('\'=HYPERLINK("http://example.invalid","x")');
		expect(find(t, 'operating point', 'note')?.[2]).toBe("'@SUM(A1:A2)");
		expect(find(t, 'operating point', 'MV')?.[2]).toBe('-5');
	});

	it('marks an integrating gain as a rate per second', () => {
		const ipdt = doc({
			revision: {
				...doc().revision,
				structure: 'ipdt',
				parametersSeconds: { k: 0.002, theta: 30 },
				parametersInTimeUnit: { k: 0.12, theta: 0.5 },
				transferFunction: { num: [0.002], den: [1, 0], delaySeconds: 30 }
			}
		});
		expect(find(rows(modelCsv(ipdt)), 'parameter', 'k')).toEqual(['parameter', 'k', '0.002', '°C/%/s', '0.12 °C/%/min']);
	});
});

describe('exportFilename', () => {
	it('names the file by asset tag, model id and revision number', () => {
		expect(exportFilename(doc(), 'json')).toBe('TIC-2201_model-12_rev-3.json');
		expect(exportFilename(doc(), 'csv')).toBe('TIC-2201_model-12_rev-3.csv');
	});
	it('replaces characters that are not safe in a file name or a header', () => {
		const odd = doc({ asset: { ...doc().asset, tag: 'FIC/12"A' } });
		expect(exportFilename(odd, 'csv')).toBe('FIC_12_A_model-12_rev-3.csv');
		const dots = doc({ asset: { ...doc().asset, tag: '..X' } });
		expect(exportFilename(dots, 'csv')).toBe('_X_model-12_rev-3.csv');
	});
});
