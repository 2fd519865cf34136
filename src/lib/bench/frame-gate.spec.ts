/** requestAnimationFrame coalescing of the live recompute, with a hand-driven frame clock. */
import { describe, expect, it } from 'vitest';
import { FrameGate } from './frame-gate';

function clock() {
	let callbacks: (() => void)[] = [];
	return {
		raf: (cb: () => void) => callbacks.push(cb),
		frame() {
			const now = callbacks;
			callbacks = [];
			for (const cb of now) cb();
		}
	};
}

describe('FrameGate', () => {
	it('starts the first change of a frame at once and merges the rest into one job at the next frame', () => {
		const c = clock();
		const ran: { value: number; t0: number }[] = [];
		const gate = new FrameGate<{ value: number; t0: number }>((x) => ran.push(x), c.raf, (a, b) => ({ value: b.value, t0: Math.min(a.t0, b.t0) }));
		gate.submit({ value: 1, t0: 10 });
		gate.submit({ value: 2, t0: 11 });
		gate.submit({ value: 3, t0: 12 });
		expect(ran).toEqual([{ value: 1, t0: 10 }]);
		c.frame();
		expect(ran).toEqual([
			{ value: 1, t0: 10 },
			{ value: 3, t0: 11 }
		]);
		c.frame();
		gate.submit({ value: 4, t0: 20 });
		expect(ran.at(-1)).toEqual({ value: 4, t0: 20 });
		expect(ran).toHaveLength(3);
	});

	it('runs nothing extra when a frame passes without changes', () => {
		const c = clock();
		const ran: number[] = [];
		const gate = new FrameGate<number>((x) => ran.push(x), c.raf);
		gate.submit(1);
		c.frame();
		c.frame();
		expect(ran).toEqual([1]);
	});
});
