import { describe, expect, it } from 'vitest';
import { POST } from './+server';

async function post(body: string) {
	const request = new Request('http://localhost/api/v1/analysis', { method: 'POST', headers: { 'content-type': 'application/json' }, body });
	// The handler only reads `request`.
	const res = await POST({ request } as unknown as Parameters<typeof POST>[0]);
	return { status: res.status, json: await res.json() };
}

describe('POST /api/v1/analysis', () => {
	it('returns the analysis for a valid request (same as analyze())', async () => {
		const { status, json } = await post(JSON.stringify({ plant: { num: [1.2], den: [4, 1], delay: 0.8 }, controller: { type: 'PI', kp: 2.0833333333333335, ti: 4 }, options: { points: 200 } }));
		expect(status).toBe(200);
		expect(json.closedLoop.stable).toBe(true);
		expect(json.step.t).toHaveLength(200);
		// GM = π for SIMC PI with τc = θ (Skogestad 2003; W5 [C]).
		expect(json.margins.gainMargin).toBeCloseTo(Math.PI, 6);
	});

	it('400 with { error, field } for schema failures', async () => {
		const { status, json } = await post(JSON.stringify({ plant: { num: [1], den: [0, 0] }, controller: { type: 'P', kp: 1 } }));
		expect(status).toBe(400);
		expect(json.field).toBe('plant.den');
		expect(json.error).toMatch(/zero/);
	});

	it('400 for a body that is not JSON', async () => {
		const { status, json } = await post('{not json');
		expect(status).toBe(400);
		expect(json.field).toBeNull();
	});

	it('400 naming the field when the engine cannot analyse the loop (ill-posed: 1 + C(∞)G(∞) = 0)', async () => {
		const { status, json } = await post(JSON.stringify({ plant: { num: [1, 1], den: [1, 2] }, controller: { type: 'P', kp: -1 } }));
		expect(status).toBe(400);
		expect(json.field).toBe('controller.kp');
	});
});
