/**
 * The local mail catcher as its own process (run with tsx; `npm start` starts it when SMTP_URL is
 * empty):
 *
 *   npx tsx scripts/mail-catcher.ts
 *
 * Listens on 127.0.0.1:SMTP_CATCHER_PORT (default 2525) and stores every message it receives in
 * the `caught_mail` table of DB_NAME. DB_PORT and DB_PASSWORD default to this working copy's
 * private server. Stops on SIGINT or SIGTERM.
 */
import { applyLocalDatabaseEnv } from './db.mjs';
import { env } from '../src/lib/server/env';
import { closeDatabase } from '../src/lib/server/db/connection';
import { startMailCatcher } from '../src/lib/server/mail/catcher';

applyLocalDatabaseEnv(process.env);

async function main(): Promise<void> {
	const config = env();
	const catcher = await startMailCatcher({ port: config.SMTP_CATCHER_PORT });
	process.stdout.write(
		`[mail-catcher] listening on 127.0.0.1:${catcher.port}, storing mail in ${config.DB_NAME} (administrators read it in the app)\n`
	);
	let stopping = false;
	const stop = async (signal: string) => {
		if (stopping) return;
		stopping = true;
		process.stdout.write(`[mail-catcher] ${signal}: stopping\n`);
		await catcher.close();
		await closeDatabase();
		process.exit(0);
	};
	process.on('SIGINT', () => void stop('SIGINT'));
	process.on('SIGTERM', () => void stop('SIGTERM'));
}

main().catch((error: unknown) => {
	const message = error instanceof Error ? error.message : String(error);
	process.stderr.write(`[mail-catcher] could not start: ${message}\n`);
	process.exit(1);
});
