/**
 * Helpers of the browser tests that need workflow data the demo seed does not have (a revision
 * by a given person in a given state): they call the revision services directly against the same
 * database as the server under test (both read DB_* from the environment; `npm test` sets them).
 * Only what a person could also do through the pages; nothing bypasses the services.
 */
import { Op } from 'sequelize';
import { ModelRevision, PlantModel, User, initModels } from '../../src/lib/server/db/models';
import { closeDatabase } from '../../src/lib/server/db/connection';
import { resetEnvCache } from '../../src/lib/server/env';
import { OPEN_STATES } from '../../src/lib/workflow/state-machine';
import type { Acting } from '../../src/lib/server/workflow-common';

/** How the services see a demo person act (looked up by e-mail). */
export async function actingByEmail(email: string): Promise<Acting> {
	resetEnvCache();
	initModels();
	const u = await User.findOne({ where: { email } });
	if (!u) throw new Error(`No user ${email} in the database the tests use (DB_NAME=${process.env.DB_NAME ?? 'default'}).`);
	return { user: { id: Number(u.id), email: u.email, name: u.name, role: u.role }, ip: '127.0.0.1' };
}

/**
 * An active model with an approved revision of one of `structures`, no open revision, not among
 * `exclude` (so two tests never pick the same one); its id and approved revision's id.
 */
export async function quietApprovedModel(
	structures: readonly string[] = ['fopdt', 'sopdt', 'ipdt'],
	exclude: readonly number[] = []
): Promise<{ modelId: number; approvedRevisionId: number }> {
	initModels();
	const models = await PlantModel.findAll({
		where: { status: 'active', approved_revision_id: { [Op.ne]: null }, ...(exclude.length ? { id: { [Op.notIn]: [...exclude] } } : {}) },
		order: [['id', 'ASC']]
	});
	for (const m of models) {
		const open = await ModelRevision.count({ where: { model_id: m.id, state: [...OPEN_STATES] } });
		if (open > 0) continue;
		const approved = await ModelRevision.findByPk(Number(m.approved_revision_id));
		if (approved && structures.includes(approved.structure)) return { modelId: Number(m.id), approvedRevisionId: Number(approved.id) };
	}
	throw new Error('The demo data has no approved model without an open revision left for this test.');
}

/** Close the services' connection pool (afterAll). */
export async function closeServices(): Promise<void> {
	await closeDatabase();
}
