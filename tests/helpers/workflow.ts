/**
 * Fixtures of the workflow and mail integration tests: people of every role, a site with an area,
 * and a valid revision input. Invented data of the demo scenario's kind; names are unique per run.
 */
import { Area, Site, User, initModels } from '../../src/lib/server/db/models';
import type { Role } from '../../src/lib/auth/roles';
import type { Acting } from '../../src/lib/server/workflow-common';
import type { RevisionInput } from '../../src/lib/schemas/revision';

export const RUN = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`;

/** A stored person and how services see them acting. */
export interface Person {
	id: number;
	email: string;
	name: string;
	role: Role;
	acting: Acting;
}

/** Creates a person (no usable password: the tests never sign in). */
export async function person(key: string, role: Role, options: { active?: boolean; digestOptOut?: boolean } = {}): Promise<Person> {
	initModels();
	const email = `${key}.${RUN}@workflow.invalid`;
	const name = `${key[0].toUpperCase()}${key.slice(1)} ${RUN.slice(-4)}`;
	const u = await User.create({
		email,
		name,
		role,
		password_hash: '$2b$10$invalidinvalidinvalidinvalidinvalidinvalidinvalidinvali',
		active: options.active ?? true,
		digest_opt_out: options.digestOptOut ?? false,
		last_sign_in_at: null
	});
	const id = Number(u.id);
	return { id, email, name, role, acting: { user: { id, email, name, role }, ip: '127.0.0.1' } };
}

/** A site and one area; returns the area id. */
export async function place(code: string): Promise<{ siteId: number; areaId: number }> {
	initModels();
	const site = await Site.create({ code: `${code}${RUN.slice(-4)}`.slice(0, 32), name: `Brackwater ${code}`, description: null });
	const area = await Area.create({ site_id: Number(site.id), code: 'PRF', name: 'Proofing', description: null });
	return { siteId: Number(site.id), areaId: Number(area.id) };
}

/** A valid FOPDT revision in seconds; override any field. */
export function fopdtInput(over: Partial<RevisionInput> = {}): RevisionInput {
	return {
		structure: 'fopdt',
		sopdtForm: null,
		k: 0.81,
		tau: 180,
		tau2: null,
		zeta: null,
		wn: null,
		theta: 25,
		num: null,
		den: null,
		timeUnit: 's',
		mvName: 'Steam injection valve',
		mvUnit: '%',
		mvMin: 0,
		mvMax: 100,
		pvName: 'Relative humidity',
		pvUnit: '%RH',
		pvMin: 40,
		pvMax: 95,
		opMv: 30,
		opPv: 78,
		opNote: 'Proofer at 36 °C, doors closed.',
		method: 'two_point',
		testDate: '2026-09-01',
		fitR2: null,
		fitRmse: null,
		validRange: 'Valve 20–45 %, 70–85 %RH',
		revalidateBy: '2027-09-01',
		changeSummary: 'First identification from a bump test.',
		dataAttachmentId: null,
		...over
	};
}
