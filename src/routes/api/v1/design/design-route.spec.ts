import { describe, expect, it } from 'vitest';
import { POST } from './+server';

type Handler = (event: { request: Request }) => Promise<Response>;
const post = (body: string) =>
	(POST as unknown as Handler)({
		request: new Request('http://localhost/api/v1/design', { method: 'POST', body, headers: { 'content-type': 'application/json' } })
	});

describe('POST /api/v1/design', () => {
	it('answers with the placed gains', async () => {
		// PI on K/(τs+1), K = 2, τ = 5, ζ = 0.7, ωn = 0.8: Kc = 2.3, Ti = 1.4375 (fixture
		// design.firstOrderPI, numpy coefficient match; Åström & Murray PI pole placement, from memory).
		const res = await post(JSON.stringify({ plant: { structure: 'fopdt', k: 2, tau: 5 }, controller: 'PI', target: { zeta: 0.7, wn: 0.8 } }));
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body.ideal.kp).toBeCloseTo(2.3, 12);
		expect(body.ideal.ti).toBeCloseTo(1.4375, 12);
		expect(body.closedLoopPoles).toHaveLength(2);
	});

	it('answers 400 naming the field for a bad body or an unreachable target', async () => {
		const bad = await post(JSON.stringify({ plant: { structure: 'fopdt', k: 2, tau: 5 }, controller: 'PI', target: { zeta: 0, wn: 1 } }));
		expect(bad.status).toBe(400);
		expect(await bad.json()).toMatchObject({ field: 'target.zeta' });
		const unreachable = await post(JSON.stringify({ plant: { structure: 'fopdt', k: 2, tau: 5 }, controller: 'PD', target: { zeta: 0.7, wn: 1 } }));
		expect(unreachable.status).toBe(400);
		const body = await unreachable.json();
		expect(body.field).toBe('controller');
		expect(body.error).toMatch(/single closed-loop pole/);
	});
});
