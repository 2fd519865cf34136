/**
 * Schema migrations with umzug. Migrations are imported statically so they survive the build;
 * add a new one to the list below, never edit an applied one.
 */
import { Umzug, SequelizeStorage } from 'umzug';
import type { QueryInterface } from 'sequelize';
import { sequelize } from './connection';
import * as m0001 from './migrations/0001-initial';
import * as m0002 from './migrations/0002-workflow';

type Migration = {
	name: string;
	up: (p: { context: QueryInterface }) => Promise<void>;
	down: (p: { context: QueryInterface }) => Promise<void>;
};

export const MIGRATIONS: Migration[] = [
	{ name: '0001-initial', up: m0001.up, down: m0001.down },
	{ name: '0002-workflow', up: m0002.up, down: m0002.down }
];

/** An umzug instance bound to the shared connection, storing applied names in `schema_migrations`. */
export function migrator(logger: Console | undefined = undefined): Umzug<QueryInterface> {
	const db = sequelize();
	return new Umzug({
		migrations: MIGRATIONS.map((m) => ({ name: m.name, up: m.up, down: m.down })),
		context: db.getQueryInterface(),
		storage: new SequelizeStorage({ sequelize: db, tableName: 'schema_migrations' }),
		logger
	});
}

/** Apply every pending migration; returns the names applied. */
export async function migrateUp(): Promise<string[]> {
	const done = await migrator().up();
	return done.map((m) => m.name);
}

/** Revert every applied migration (to an empty schema); returns the names reverted. */
export async function migrateDownAll(): Promise<string[]> {
	const done = await migrator().down({ to: 0 });
	return done.map((m) => m.name);
}
