#!/usr/bin/env node
/**
 * `npm run bench`: the speed targets, measured (never by timed unit tests).
 *   1. the analysis engine in Node against the same work in SciPy (scripts/bench-analysis.ts,
 *      tests/reference/bench_scipy.py with Debian's python3-scipy, installed when missing);
 *   2. the bench's input-to-redraw time in headless Chromium (scripts/bench-browser.ts) against the
 *      built server on a free port, with the demo data in `loopledger_test`.
 * Stops what it started. `--engine` runs only part 1. Dependency-free before node_modules exists.
 */
import { spawn, spawnSync } from 'node:child_process';
import { closeSync, mkdirSync, openSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, UserFacingError, aptInstall, isMain, prepare } from './prepare.mjs';
import * as db from './db.mjs';
import { appServerEnv, bin, runOrThrow, runningChildren, startServices, waitForHttp } from './start.mjs';

const BENCH_AUTH_SECRET = 'bench-only-auth-secret-not-for-production-0123456789';

function say(message) {
	process.stdout.write(`[bench] ${message}\n`);
}

/** Debian's SciPy is the reference the engine is timed against. */
function ensureScipy() {
	const probe = spawnSync('/usr/bin/python3', ['-c', 'import scipy, numpy'], { stdio: 'ignore' });
	if (probe.status === 0) return;
	aptInstall(['python3-scipy', 'python3-numpy'], 'The SciPy comparison of the benchmark');
}

async function browserBench(services) {
	const env = { ...process.env, ...services.env, DB_NAME: db.TEST_DATABASE };
	await runOrThrow('vite build', bin('vite'), ['build'], { env: { ...env, NODE_ENV: 'production' } });
	db.createDatabase(db.TEST_DATABASE, { fresh: true });
	await runOrThrow('migrate', bin('tsx'), ['scripts/migrate.ts', 'up'], { env });
	await runOrThrow('demo seed', bin('tsx'), ['scripts/seed.ts'], { env });
	const port = await db.freePort(Number(process.env.TEST_PORT) || 4173);
	const results = join(ROOT, 'bench-results');
	mkdirSync(results, { recursive: true });
	const log = openSync(join(results, 'app-server.log'), 'w');
	const serverEnv = { ...appServerEnv({ port, dbEnv: services.env, demo: true, authSecret: BENCH_AUTH_SECRET }), DB_NAME: db.TEST_DATABASE, ORIGIN: `http://127.0.0.1:${port}` };
	const server = spawn(process.execPath, ['build'], { cwd: ROOT, env: serverEnv, stdio: ['ignore', log, log] });
	closeSync(log);
	runningChildren.add(server);
	try {
		await waitForHttp(`http://127.0.0.1:${port}/`, server);
		await runOrThrow('browser benchmark', bin('tsx'), ['scripts/bench-browser.ts'], { env: { ...env, BASE_URL: `http://127.0.0.1:${port}` } });
	} finally {
		const gone = new Promise((r) => server.once('exit', r));
		server.kill('SIGTERM');
		const timer = setTimeout(() => server.kill('SIGKILL'), 10_000);
		await gone;
		clearTimeout(timer);
		runningChildren.delete(server);
	}
}

async function main() {
	const engineOnly = process.argv.includes('--engine');
	prepare({ browser: !engineOnly });
	ensureScipy();
	say('engine: analyze() in Node vs the same work in SciPy');
	await runOrThrow('engine benchmark', bin('tsx'), ['scripts/bench-analysis.ts']);
	if (engineOnly) return;
	say('bench page: input-to-redraw time in headless Chromium');
	const services = await startServices({ mode: 'test', databaseName: db.TEST_DATABASE });
	try {
		await browserBench(services);
	} finally {
		await services.stopAll();
	}
}

if (isMain(import.meta.url)) {
	main().catch((error) => {
		process.stderr.write(`${error instanceof UserFacingError ? error.message : error?.stack ?? error}\n`);
		process.exit(1);
	});
}
