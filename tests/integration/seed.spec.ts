/**
 * The demo seed on a real MariaDB: the counts and states the scenario promises, transfer functions
 * that agree with the engine's structure conversion, listing columns that agree with the poles of
 * the stored denominators, tuning sets that agree with the engine's rules (and one with the
 * published SIMC formula), proper password hashes, one audit event, and a refusal to seed twice.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import bcrypt from 'bcryptjs';
import { sequelize } from '../../src/lib/server/db/connection';
import { DEMO_USERS } from '../../src/lib/server/seed/demo-users';
import { DEMO_BCRYPT_COST, DemoSeedRefused, plantOfRevision, seedDemo } from '../../src/lib/server/seed/demo';
import { plantTransferFunction } from '../../src/lib/control/plants';
import { roots } from '../../src/lib/control/roots';
import { tune, type TuningRuleId } from '../../src/lib/control/tuning';
import { closeTestDatabase, useTestDatabaseEnv, withSeed } from '../helpers/db';

interface RevisionRow {
	id: number;
	model_id: number;
	revision_no: number;
	state: string;
	structure: 'fopdt' | 'sopdt' | 'ipdt' | 'second_order' | 'rational';
	parameters: string;
	num: string;
	den: string;
	delay_s: number;
	gain: number | null;
	time_constant_s: number | null;
	author_id: number;
	reviewer_id: number | null;
	approved_at: Date | null;
	revalidate_by: string | null;
}

interface ModelRow {
	id: number;
	status: string;
	approved_revision_id: number | null;
	withdrawn_reason: string | null;
	withdrawn_at: Date | null;
}

const SEED_NOW = new Date();
const TODAY = SEED_NOW.toISOString().slice(0, 10);

async function select<T extends object>(sql: string, replacements: Record<string, unknown> = {}): Promise<T[]> {
	return sequelize().query<T>(sql, { type: QueryTypes.SELECT, replacements });
}

async function count(table: string): Promise<number> {
	const [row] = await select<{ n: number }>(`SELECT COUNT(*) AS n FROM ${table}`);
	return Number(row.n);
}

const json = <T>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;

/** Relative difference, for floating-point comparisons of stored values. */
function close(actual: number | null, expected: number, rel = 1e-12): boolean {
	return actual !== null && Math.abs(actual - expected) <= rel * Math.max(1, Math.abs(expected));
}

describe('demo seed', () => {
	let revisions: RevisionRow[] = [];
	let models: ModelRow[] = [];

	beforeAll(async () => {
		useTestDatabaseEnv();
		await withSeed({ now: SEED_NOW });
		revisions = await select<RevisionRow>(
			`SELECT id, model_id, revision_no, state, structure, parameters, num, den, delay_s, gain, time_constant_s,
			        author_id, reviewer_id, approved_at, DATE_FORMAT(revalidate_by, '%Y-%m-%d') AS revalidate_by
			 FROM model_revisions ORDER BY model_id, revision_no`
		);
		models = await select<ModelRow>('SELECT id, status, approved_revision_id, withdrawn_reason, withdrawn_at FROM plant_models');
	});
	afterAll(async () => {
		await closeTestDatabase();
	});

	it('creates the scenario: 2 sites, at least 8 areas, 20 assets and 30 plant models', async () => {
		expect(await count('sites')).toBe(2);
		expect(await count('areas')).toBeGreaterThanOrEqual(8);
		expect(await count('assets')).toBeGreaterThanOrEqual(20);
		expect(models.length).toBeGreaterThanOrEqual(30);
		const names = await select<{ name: string }>('SELECT name FROM sites ORDER BY name');
		expect(names.map((s) => s.name)).toEqual(['Brackwater Bakery — Tallowgate', 'Brackwater Dairy — Wrenfold Mill']);
	});

	it('covers all five structures, with overdamped and underdamped SOPDT models', () => {
		const structures = new Set(revisions.map((r) => r.structure));
		expect([...structures].sort()).toEqual(['fopdt', 'ipdt', 'rational', 'second_order', 'sopdt']);
		const sopdt = revisions.filter((r) => r.structure === 'sopdt').map((r) => json<{ tau2?: number; zeta?: number }>(r.parameters));
		expect(sopdt.some((p) => p.tau2 !== undefined)).toBe(true);
		expect(sopdt.some((p) => p.zeta !== undefined && p.zeta < 1)).toBe(true);
	});

	it('has one user per role, with bcrypt hashes of cost 10 that match the demo passwords', async () => {
		const users = await select<{ email: string; role: string; password_hash: string }>('SELECT email, role, password_hash FROM users');
		expect(users.length).toBe(DEMO_USERS.length);
		expect(new Set(users.map((u) => u.role))).toEqual(new Set(['viewer', 'engineer', 'reviewer', 'admin']));
		for (const demo of DEMO_USERS) {
			const row = users.find((u) => u.email === demo.email);
			expect(row?.role).toBe(demo.role);
			expect(bcrypt.getRounds(row?.password_hash ?? '')).toBe(DEMO_BCRYPT_COST);
			expect(await bcrypt.compare(demo.password, row?.password_hash ?? '')).toBe(true);
		}
	});

	it('has at least two revisions in review, each newer than the approved revision of its model', () => {
		const inReview = revisions.filter((r) => r.state === 'in_review');
		expect(inReview.length).toBeGreaterThanOrEqual(2);
		const withApproved = inReview.filter((r) => models.find((m) => m.id === r.model_id)?.approved_revision_id);
		expect(withApproved.length).toBeGreaterThanOrEqual(2);
		for (const r of withApproved) {
			const approvedId = models.find((m) => m.id === r.model_id)?.approved_revision_id;
			const approvedRevision = revisions.find((x) => x.id === approvedId);
			expect(r.revision_no).toBeGreaterThan(approvedRevision?.revision_no ?? Infinity);
		}
	});

	it('has exactly one model past its revalidate-by date (the approved, else latest, revision; withdrawn excluded)', () => {
		const stale = models.filter((m) => {
			if (m.status === 'withdrawn') return false;
			const own = revisions.filter((r) => r.model_id === m.id);
			const current = own.find((r) => r.id === m.approved_revision_id) ?? own[own.length - 1];
			return current.revalidate_by !== null && current.revalidate_by < TODAY;
		});
		expect(stale.length).toBe(1);
	});

	it('has exactly one withdrawn model, with its reason and time', () => {
		const withdrawn = models.filter((m) => m.status === 'withdrawn');
		expect(withdrawn.length).toBe(1);
		expect(withdrawn[0].withdrawn_reason?.length ?? 0).toBeGreaterThan(20);
		expect(withdrawn[0].withdrawn_at).not.toBeNull();
	});

	it('keeps revision histories: superseded first revisions followed by an approved one', () => {
		const histories = models.filter((m) => {
			const own = revisions.filter((r) => r.model_id === m.id);
			return own[0]?.state === 'superseded' && own.some((r) => r.revision_no === 2 && r.state === 'approved');
		});
		expect(histories.length).toBeGreaterThanOrEqual(3);
		for (const m of models) {
			const approvedStates = revisions.filter((r) => r.model_id === m.id && r.state === 'approved');
			expect(approvedStates.length).toBeLessThanOrEqual(1);
		}
	});

	it('has every approved revision reviewed by a reviewer other than its author', async () => {
		const reviewers = new Set(
			(await select<{ id: number }>("SELECT id FROM users WHERE role = 'reviewer'")).map((u) => Number(u.id))
		);
		const approvedRevisions = revisions.filter((r) => r.state === 'approved' || r.state === 'superseded');
		expect(approvedRevisions.length).toBeGreaterThanOrEqual(25);
		for (const r of approvedRevisions) {
			expect(r.reviewer_id).not.toBeNull();
			expect(r.reviewer_id).not.toBe(r.author_id);
			expect(reviewers.has(Number(r.reviewer_id))).toBe(true);
			expect(r.approved_at).not.toBeNull();
		}
	});

	it('stores num, den and delay exactly as the engine converts each structure', () => {
		for (const r of revisions) {
			const params = json<Record<string, number>>(r.parameters);
			const coefficients = r.structure === 'rational' ? { num: json<number[]>(r.num), den: json<number[]>(r.den) } : {};
			const tf = plantTransferFunction(plantOfRevision(r.structure, params, coefficients));
			expect({ id: r.id, num: json<number[]>(r.num), den: json<number[]>(r.den), delay: Number(r.delay_s) }).toEqual({
				id: r.id,
				num: tf.num,
				den: tf.den,
				delay: tf.delay
			});
		}
	});

	it('stores rational models with only the dead time in parameters', () => {
		const rational = revisions.filter((r) => r.structure === 'rational');
		expect(rational.length).toBeGreaterThanOrEqual(3);
		for (const r of rational) expect(Object.keys(json<object>(r.parameters))).toEqual(['theta']);
	});

	it('fills the gain column with the static (or integrating) gain of num/den', () => {
		for (const r of revisions) {
			const num = json<number[]>(r.num);
			const den = json<number[]>(r.den);
			// Final value theorem (common practice): K = num(0)/den(0); with r poles at the origin,
			// the gain of s^r·G(s) at s = 0, i.e. num(0) over the lowest non-zero coefficient of den.
			let k = den.length - 1;
			while (k > 0 && den[k] === 0) k--;
			const expected = num[num.length - 1] / den[k];
			expect(close(r.gain, expected, 1e-9), `revision ${r.id}: gain ${r.gain} vs ${expected}`).toBe(true);
		}
	});

	it('fills time_constant_s with −1/Re of the slowest pole of den (null for IPDT and rational)', () => {
		for (const r of revisions) {
			if (r.structure === 'ipdt' || r.structure === 'rational') {
				expect(r.time_constant_s).toBeNull();
				continue;
			}
			// Time constant of a pole p: −1/Re(p) (common practice; Ogata, Modern Control Engineering,
			// 5th ed., 2010, §5-3); the dominant pole is the one with the smallest |Re p|.
			const poles = roots(json<number[]>(r.den)).filter((p) => Math.hypot(p.re, p.im) > 1e-12);
			const slowest = Math.min(...poles.map((p) => Math.abs(p.re)));
			expect(close(r.time_constant_s, 1 / slowest, 1e-9), `revision ${r.id}: ${r.time_constant_s} vs ${1 / slowest}`).toBe(true);
		}
	});

	it('stores tuning sets that agree with the engine rule for the approved model', async () => {
		const sets = await select<{
			rule: TuningRuleId;
			controller_type: 'PI' | 'PID';
			form: string;
			kp: number;
			ti_s: number | null;
			td_s: number | null;
			rule_parameter: number | null;
			state: string;
			parameters: string;
			structure: 'fopdt' | 'sopdt' | 'ipdt';
			model_state: string;
		}>(
			`SELECT t.rule, t.controller_type, t.form, t.kp, t.ti_s, t.td_s, t.rule_parameter, t.state, r.parameters, r.structure, r.state AS model_state
			 FROM tuning_sets t JOIN model_revisions r ON r.id = t.model_revision_id`
		);
		expect(sets.length).toBeGreaterThanOrEqual(3);
		expect(new Set(sets.map((s) => s.state))).toEqual(new Set(['approved', 'draft', 'in_review']));
		expect(new Set(sets.map((s) => s.rule))).toEqual(new Set(['simc', 'amigo', 'lambda']));
		for (const s of sets) {
			expect(s.model_state).toBe('approved');
			const p = json<{ k: number; tau?: number; tau2?: number; theta: number }>(s.parameters);
			const result = tune({
				plant: { structure: s.structure, k: p.k, tau: p.tau ?? null, tau2: p.tau2 ?? null, theta: p.theta },
				rule: s.rule,
				controller: s.controller_type,
				parameter: s.rule_parameter
			});
			expect(s.form).toBe(result.published.form);
			expect(close(s.kp, result.published.kp)).toBe(true);
			expect(s.ti_s === null ? null : Number(s.ti_s)).toBe(result.published.ti);
			expect(s.td_s === null ? null : Number(s.td_s)).toBe(result.published.td);
		}
	});

	it('stores the zone 1 SIMC PI settings given by the published formula', async () => {
		// Skogestad, "Simple analytic rules for model reduction and PID controller tuning",
		// J. Process Control 13 (2003) 291–309, FOPDT PI rule: Kc = τ1/(k(τc + θ)),
		// Ti = min(τ1, 4(τc + θ)), default τc = θ. Zone 1 (bread): k = 2.1 °C/%, τ1 = 540 s, θ = 60 s
		// → Kc = 540/(2.1·120) = 2.142857…, Ti = min(540, 480) = 480 s.
		const [row] = await select<{ kp: number; ti_s: number; td_s: number | null; rule_parameter: number }>(
			`SELECT t.kp, t.ti_s, t.td_s, t.rule_parameter FROM tuning_sets t
			 JOIN plant_models pm ON pm.id = t.model_id
			 WHERE t.loop_tag = 'TIC-2104' AND t.rule = 'simc' AND pm.title LIKE '%(bread)%'`
		);
		expect(Number(row.rule_parameter)).toBe(60);
		expect(Number(row.kp)).toBeCloseTo(540 / (2.1 * 120), 12);
		expect(Number(row.ti_s)).toBe(480);
		expect(row.td_s).toBeNull();
	});

	it('writes notes in Markdown with $…$ math', async () => {
		const notes = await select<{ body_md: string }>('SELECT body_md FROM notes');
		expect(notes.length).toBeGreaterThanOrEqual(2);
		expect(notes.filter((n) => /\$[^$]+\$/.test(n.body_md)).length).toBeGreaterThanOrEqual(2);
	});

	it('records exactly one demo.seed audit event', async () => {
		const events = await select<{ action: string; actor_id: number | null }>('SELECT action, actor_id FROM audit_events');
		expect(events).toEqual([{ action: 'demo.seed', actor_id: null }]);
	});

	it('refuses to seed again over existing data and leaves it unchanged', async () => {
		const before = { users: await count('users'), models: await count('plant_models'), revisions: await count('model_revisions') };
		await expect(seedDemo()).rejects.toBeInstanceOf(DemoSeedRefused);
		expect({ users: await count('users'), models: await count('plant_models'), revisions: await count('model_revisions') }).toEqual(before);
		expect(await count('audit_events')).toBe(1);
	});
});
