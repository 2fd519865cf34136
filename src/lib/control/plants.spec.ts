import { describe, expect, it } from 'vitest';
import { perturbPlant, plantTransferFunction, recognisePlant } from './plants';
import { AnalysisInputError } from './errors';

describe('plant structures', () => {
	it('map to num/den/delay by their definitions (PRODUCT.md "Plant model")', () => {
		expect(plantTransferFunction({ structure: 'fopdt', k: 2, tau: 5, theta: 1 })).toEqual({ num: [2], den: [5, 1], delay: 1 });
		expect(plantTransferFunction({ structure: 'sopdt', k: 2, tau: 3, tau2: 1, theta: 0.5 })).toEqual({ num: [2], den: [3, 4, 1], delay: 0.5 });
		expect(plantTransferFunction({ structure: 'sopdt-underdamped', k: 2, wn: 3, zeta: 0.2, theta: 0.1 })).toEqual({ num: [18], den: [1, 1.2000000000000002, 9], delay: 0.1 });
		expect(plantTransferFunction({ structure: 'ipdt', k: 0.5, theta: 2 })).toEqual({ num: [0.5], den: [1, 0], delay: 2 });
		expect(plantTransferFunction({ structure: 'second-order', k: 1, wn: 2, zeta: 0.5 })).toEqual({ num: [4], den: [1, 2, 4], delay: 0 });
		expect(plantTransferFunction({ structure: 'rational', num: [0, 1, 1], den: [1, 3, 2] })).toEqual({ num: [1, 1], den: [1, 3, 2], delay: 0 });
	});

	it('reject invalid parameters naming the field', () => {
		const field = (f: () => unknown) => {
			try {
				f();
			} catch (e) {
				return (e as AnalysisInputError).field;
			}
			return null;
		};
		expect(field(() => plantTransferFunction({ structure: 'fopdt', k: 1, tau: 0 }))).toBe('plant.tau');
		expect(field(() => plantTransferFunction({ structure: 'fopdt', k: 1, tau: 1, theta: -1 }))).toBe('plant.theta');
		expect(field(() => plantTransferFunction({ structure: 'ipdt', k: 0 }))).toBe('plant.k');
		expect(field(() => plantTransferFunction({ structure: 'second-order', k: 1, wn: 1, zeta: -0.1 }))).toBe('plant.zeta');
	});

	it('recognises first- and second-order denominators and round-trips', () => {
		const cases = [
			{ structure: 'fopdt', k: 2, tau: 5, theta: 1 },
			{ structure: 'sopdt', k: 2, tau: 3, tau2: 1, theta: 0.5 },
			{ structure: 'sopdt-underdamped', k: 2, wn: 3, zeta: 0.2, theta: 0.1 },
			{ structure: 'ipdt', k: 0.5, theta: 2 },
			{ structure: 'second-order', k: 1, wn: 2, zeta: 0.5 }
		] as const;
		for (const c of cases) {
			const back = recognisePlant(plantTransferFunction(c)) as unknown as Record<string, number | string>;
			expect(back.structure).toBe(c.structure);
			for (const [key, v] of Object.entries(c)) if (typeof v === 'number') expect(back[key] as number).toBeCloseTo(v, 12);
		}
		expect(recognisePlant({ num: [1, 1], den: [1, 3, 2], delay: 0 }).structure).toBe('rational');
	});

	it('perturbs gain, dead time and time constants; a rational model is stretched by s → αs', () => {
		expect(perturbPlant({ structure: 'sopdt', k: 2, tau: 3, tau2: 1, theta: 0.5 }, { gainFactor: 1.1, delayFactor: 2, timeConstantFactor: 0.5 })).toEqual({
			structure: 'sopdt',
			k: 2.2,
			tau: 1.5,
			tau2: 0.5,
			theta: 1
		});
		const r = perturbPlant({ structure: 'rational', num: [1], den: [1, 3, 2], delay: 1 }, { gainFactor: 2, delayFactor: 1.5, timeConstantFactor: 2 });
		expect(r).toEqual({ structure: 'rational', num: [2], den: [4, 6, 2], delay: 1.5 });
	});
});
