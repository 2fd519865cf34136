/**
 * The migrations on a real MariaDB: all up, all down to an empty schema (only umzug's own table
 * left), all up again; and the constraints the schema promises (append-only audit log, unique
 * asset tag per site, foreign keys).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { sequelize } from '../../src/lib/server/db/connection';
import { MIGRATIONS, migrateUp, migrator } from '../../src/lib/server/db/migrator';
import { closeTestDatabase, dropAllTables, migrateAllDown, tableNames, useTestDatabaseEnv } from '../helpers/db';

/** Tables the initial migration creates (0001-initial); later migrations may add more. */
const SCHEMA_TABLES = [
	'api_tokens',
	'areas',
	'assets',
	'attachments',
	'audit_events',
	'model_revisions',
	'notes',
	'plant_models',
	'revision_contributors',
	'sign_in_throttle',
	'sites',
	'tuning_sets',
	'users'
];

async function triggerNames(): Promise<string[]> {
	const rows = await sequelize().query<{ name: string }>(
		'SELECT TRIGGER_NAME AS name FROM information_schema.TRIGGERS WHERE TRIGGER_SCHEMA = DATABASE() ORDER BY TRIGGER_NAME',
		{ type: QueryTypes.SELECT }
	);
	return rows.map((r) => r.name);
}

const now = () => new Date();

/** Inserts a site and returns its id (raw SQL, so the test exercises the schema, not the models). */
async function insertSite(code: string): Promise<number> {
	const [id] = await sequelize().query(
		'INSERT INTO sites (code, name, created_at, updated_at) VALUES (:code, :name, :t, :t)',
		{ replacements: { code, name: `Site ${code}`, t: now() }, type: QueryTypes.INSERT }
	);
	return Number(id);
}

async function insertArea(siteId: number, code: string): Promise<number> {
	const [id] = await sequelize().query(
		'INSERT INTO areas (site_id, code, name, created_at, updated_at) VALUES (:siteId, :code, :name, :t, :t)',
		{ replacements: { siteId, code, name: `Area ${code}`, t: now() }, type: QueryTypes.INSERT }
	);
	return Number(id);
}

async function insertAsset(siteId: number, areaId: number, tag: string): Promise<number> {
	const [id] = await sequelize().query(
		`INSERT INTO assets (site_id, area_id, tag, kind, name, created_at, updated_at)
		 VALUES (:siteId, :areaId, :tag, 'pump', :name, :t, :t)`,
		{ replacements: { siteId, areaId, tag, name: `Asset ${tag}`, t: now() }, type: QueryTypes.INSERT }
	);
	return Number(id);
}

describe('migrations', () => {
	let tablesAfterUp: string[] = [];
	beforeAll(async () => {
		useTestDatabaseEnv();
		await dropAllTables();
	});
	afterAll(async () => {
		await closeTestDatabase();
	});

	it('start from an empty database', async () => {
		expect(await tableNames()).toEqual([]);
	});

	it('apply every migration up, creating the whole schema and the audit triggers', async () => {
		const applied = await migrateUp();
		expect(applied).toEqual(MIGRATIONS.map((m) => m.name));
		const tables = await tableNames();
		for (const t of SCHEMA_TABLES) expect(tables).toContain(t);
		expect(tables).toContain('schema_migrations');
		tablesAfterUp = tables;
		expect(await triggerNames()).toEqual(expect.arrayContaining(['audit_events_no_delete', 'audit_events_no_update']));
		expect(await migrator().pending()).toEqual([]);
	});

	it('revert every migration down to an empty schema (only the umzug table remains)', async () => {
		const reverted = await migrateAllDown();
		expect(reverted).toEqual(MIGRATIONS.map((m) => m.name).reverse());
		expect(await tableNames()).toEqual(['schema_migrations']);
		expect(await triggerNames()).toEqual([]);
		expect((await migrator().executed()).length).toBe(0);
	});

	it('apply every migration up again after the full round trip', async () => {
		const applied = await migrateUp();
		expect(applied).toEqual(MIGRATIONS.map((m) => m.name));
		expect(tablesAfterUp.length).toBeGreaterThan(SCHEMA_TABLES.length);
		expect(await tableNames()).toEqual(tablesAfterUp);
	});

	describe('constraints of the schema', () => {
		it('the audit log refuses UPDATE and DELETE (append-only triggers)', async () => {
			const db = sequelize();
			await db.query(
				`INSERT INTO audit_events (at, action, entity_type, entity_id) VALUES (:t, 'test.append', 'test', '1')`,
				{ replacements: { t: now() }, type: QueryTypes.INSERT }
			);
			await expect(db.query(`UPDATE audit_events SET action = 'test.changed'`)).rejects.toThrow(/append-only/);
			await expect(db.query('DELETE FROM audit_events')).rejects.toThrow(/append-only/);
			const rows = await db.query<{ action: string }>('SELECT action FROM audit_events', { type: QueryTypes.SELECT });
			expect(rows).toEqual([{ action: 'test.append' }]);
		});

		it('an asset tag is unique within a site but may repeat on another site', async () => {
			const siteA = await insertSite('UA');
			const siteB = await insertSite('UB');
			const areaA = await insertArea(siteA, 'X1');
			const areaB = await insertArea(siteB, 'X1');
			await insertAsset(siteA, areaA, 'FIC-0001');
			const error = await insertAsset(siteA, areaA, 'FIC-0001').then(
				() => null,
				(e: unknown) => e as { name?: string; parent?: { message?: string } }
			);
			expect(error?.name).toBe('SequelizeUniqueConstraintError');
			expect(error?.parent?.message).toMatch(/Duplicate entry .*assets_site_tag_unique/);
			await expect(insertAsset(siteB, areaB, 'FIC-0001')).resolves.toBeGreaterThan(0);
		});

		it('a foreign key refuses an area of a missing site', async () => {
			const [{ maxId }] = await sequelize().query<{ maxId: number | null }>('SELECT MAX(id) AS maxId FROM sites', {
				type: QueryTypes.SELECT
			});
			const missing = Number(maxId ?? 0) + 1000;
			const error = await insertArea(missing, 'ZZ').then(
				() => null,
				(e: unknown) => e as { name?: string; parent?: { message?: string } }
			);
			expect(error?.name).toBe('SequelizeForeignKeyConstraintError');
			expect(error?.parent?.message).toMatch(/foreign key constraint fails.*`areas`.*REFERENCES `sites`/i);
		});
	});
});
