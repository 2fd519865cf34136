import { describe, expect, it } from 'vitest';
import { POST } from './+server';

type Handler = (event: { request: Request }) => Promise<Response>;
const post = (body: string) =>
	(POST as unknown as Handler)({
		request: new Request('http://localhost/api/v1/tuning', { method: 'POST', body, headers: { 'content-type': 'application/json' } })
	});

describe('POST /api/v1/tuning', () => {
	it('answers with the tuning contract', async () => {
		// SIMC PI on the FOPDT test vector: Kc = 2.08333, Ti = 4 (Skogestad 2003; reference sheet 2.11 [C]).
		const res = await post(JSON.stringify({ plant: { structure: 'fopdt', k: 1.2, tau: 4, theta: 0.8 }, rule: 'simc', controller: 'PI' }));
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(Object.keys(body).sort()).toEqual(['controller', 'ideal', 'published', 'rule', 'warnings']);
		expect(body.ideal.kp).toBeCloseTo(2.08333, 5);
		expect(body.ideal).toMatchObject({ ti: 4, td: null });
		expect(body.published.form).toBe('ideal');
	});

	it('answers 400 naming the field for a bad body', async () => {
		const res = await post(JSON.stringify({ plant: { structure: 'fopdt', k: 1.2, tau: -4, theta: 0.8 }, rule: 'simc', controller: 'PI' }));
		expect(res.status).toBe(400);
		expect(await res.json()).toMatchObject({ field: 'plant.tau' });
		const notJson = await post('{plant:');
		expect(notJson.status).toBe(400);
		expect((await notJson.json()).error).toMatch(/JSON/);
	});

	it('answers 400 saying why when the rule does not apply', async () => {
		const res = await post(JSON.stringify({ plant: { structure: 'ipdt', k: 0.5, theta: 2 }, rule: 'cohen-coon', controller: 'PI' }));
		expect(res.status).toBe(400);
		const body = await res.json();
		expect(body.field).toBe('plant.structure');
		expect(body.error).toMatch(/self-regulating/);
	});
});
