#!/usr/bin/env node
/**
 * `npm start`: the whole product on one machine.
 *   prepare (npm ci, mariadb-server) → private database → migrate → demo data once (only into a
 *   database without users) → vite build → `node build` on 127.0.0.1:PORT (default 3000).
 * Ctrl-C stops the app server; the database keeps running (`npm run db:stop` stops it).
 *
 * Dependency-free (only `node:` imports): it runs before node_modules exists. The helpers below
 * are shared with scripts/test.mjs. A new local service (mail catcher, search …) is one function
 * returning `{ env, stop }`, added to SERVICES.
 */
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, UserFacingError, isMain, prepare } from './prepare.mjs';
import * as db from './db.mjs';

/** Prints one line prefixed with the step name. */
export function say(message) {
	process.stdout.write(`[start] ${message}\n`);
}

/** Path of an executable installed by npm in node_modules/.bin. */
export function bin(name) {
	return join(ROOT, 'node_modules', '.bin', name);
}

/** Children still running, so a signal handler can end them. */
export const runningChildren = new Set();

/**
 * Runs a command to completion with inherited output. Resolves `{ code, signal }`; never rejects
 * on a non-zero exit (the caller decides what a failure means).
 */
export function run(command, args, { env = process.env, cwd = ROOT, stdio = 'inherit' } = {}) {
	return new Promise((resolvePromise) => {
		const child = spawn(command, args, { env, cwd, stdio });
		runningChildren.add(child);
		child.once('error', (error) => {
			runningChildren.delete(child);
			process.stderr.write(`${command} could not be run: ${error.message}\n`);
			resolvePromise({ code: 127, signal: null });
		});
		child.once('exit', (code, signal) => {
			runningChildren.delete(child);
			resolvePromise({ code, signal });
		});
	});
}

/** Runs a command and throws a UserFacingError naming it when it fails. */
export async function runOrThrow(label, command, args, options) {
	const { code, signal } = await run(command, args, options);
	if (code !== 0) throw new UserFacingError(`${label} failed (${signal ?? `exit ${code}`})`);
}

/** Runs a command and returns its standard output (throws when it fails). */
export async function capture(label, command, args, { env = process.env } = {}) {
	return new Promise((resolvePromise, reject) => {
		const child = spawn(command, args, { env, cwd: ROOT, stdio: ['ignore', 'pipe', 'inherit'] });
		let out = '';
		child.stdout.on('data', (chunk) => (out += chunk));
		child.once('error', (error) => reject(new UserFacingError(`${label}: ${error.message}`)));
		child.once('exit', (code) =>
			code === 0 ? resolvePromise(out) : reject(new UserFacingError(`${label} failed (exit ${code})`))
		);
	});
}

/** A random secret generated once and kept in `.data/<name>` (mode 600). */
export function persistedSecret(name) {
	const file = join(db.DATA_DIR, name);
	if (existsSync(file)) {
		const value = readFileSync(file, 'utf8').trim();
		if (value) return value;
	}
	mkdirSync(db.DATA_DIR, { recursive: true });
	const value = randomBytes(32).toString('base64url');
	writeFileSync(file, `${value}\n`, { mode: 0o600 });
	chmodSync(file, 0o600);
	return value;
}

/** Validated TCP port from an environment value, or the fallback. */
export function portFrom(value, fallback, name) {
	if (value === undefined || value === '') return fallback;
	const port = Number(value);
	if (!Number.isInteger(port) || port < 1 || port > 65535) {
		throw new UserFacingError(`${name} must be a whole number from 1 to 65535 (got "${value}").`);
	}
	return port;
}

/**
 * Polls `url` until the server answers any HTTP status, the child exits, or the timeout passes.
 * Throws with a clear message in the last two cases.
 */
export async function waitForHttp(url, child, timeoutMs = 60_000) {
	const deadline = Date.now() + timeoutMs;
	let exited = null;
	child.once('exit', (code, signal) => (exited = signal ?? code));
	while (Date.now() < deadline) {
		if (exited !== null) throw new UserFacingError(`the app server exited (${exited}) before answering at ${url}`);
		try {
			const response = await fetch(url, { redirect: 'manual', signal: AbortSignal.timeout(2000) });
			await response.arrayBuffer();
			return response.status;
		} catch {
			await new Promise((r) => setTimeout(r, 250));
		}
	}
	throw new UserFacingError(`the app server did not answer at ${url} within ${timeoutMs / 1000} s`);
}

/**
 * The private MariaDB service. `mode: 'start'` leaves the server running afterwards; `mode: 'test'`
 * stops it at the end only if this run started it, and may move to a free port when the default
 * one is taken by another program.
 */
export async function databaseService({ mode, databaseName }) {
	const info = await db.start({ fallbackPort: mode === 'test' });
	return {
		env: {
			DB_HOST: '127.0.0.1',
			DB_PORT: String(info.port),
			DB_USER: info.user,
			DB_PASSWORD: info.password,
			DB_NAME: databaseName
		},
		stop: mode === 'test' && info.startedNow ? () => db.stop() : async () => {}
	};
}

/**
 * The local mail catcher (scripts/mail-catcher.ts) on 127.0.0.1:SMTP_CATCHER_PORT (default 2525),
 * storing what the app sends in the app's database; skipped when SMTP_URL names a real relay.
 * `mode: 'test'` moves to a free port and keeps it quiet. It ends with this process.
 */
export async function mailCatcherService({ mode, env }) {
	if (process.env.SMTP_URL) {
		say('SMTP_URL is set: mail goes to that relay, no local mail catcher');
		return { env: {}, stop: async () => {} };
	}
	const wanted = portFrom(process.env.SMTP_CATCHER_PORT, 2525, 'SMTP_CATCHER_PORT');
	const port = mode === 'test' ? await db.freePort(wanted) : wanted;
	if (mode !== 'test' && (await db.portInUse(port))) {
		throw new UserFacingError(`Port ${port} on 127.0.0.1 (mail catcher) is already in use. Stop that program or choose another: SMTP_CATCHER_PORT=2526 npm start`);
	}
	const child = spawn(bin('tsx'), ['scripts/mail-catcher.ts'], {
		cwd: ROOT,
		env: { ...process.env, ...env, SMTP_CATCHER_PORT: String(port) },
		stdio: mode === 'test' ? 'ignore' : 'inherit'
	});
	child.unref();
	const kill = () => child.exitCode === null && child.signalCode === null && child.kill('SIGTERM');
	process.once('exit', kill);
	const deadline = Date.now() + 30_000;
	while (!(await db.portInUse(port))) {
		if (child.exitCode !== null || child.signalCode !== null) throw new UserFacingError(`the mail catcher exited (${child.signalCode ?? child.exitCode}) before listening on ${port}`);
		if (Date.now() > deadline) {
			kill();
			throw new UserFacingError(`the mail catcher did not listen on 127.0.0.1:${port} within 30 s`);
		}
		await new Promise((r) => setTimeout(r, 200));
	}
	say(`mail catcher on 127.0.0.1:${port} (administrators read caught mail in the app)`);
	return {
		env: { SMTP_CATCHER_PORT: String(port) },
		stop: async () => {
			if (child.exitCode !== null || child.signalCode !== null) return;
			const gone = new Promise((r) => child.once('exit', r));
			child.ref();
			kill();
			await gone;
		}
	};
}

/** Local services started before the app, in order; each returns the env it adds and how to stop it. */
export const SERVICES = [databaseService, mailCatcherService];

/** Starts every service; returns the merged env and a function stopping them in reverse order. */
export async function startServices(context) {
	const stops = [];
	const env = {};
	try {
		for (const service of SERVICES) {
			const started = await service({ ...context, env: { ...env } });
			Object.assign(env, started.env);
			stops.unshift(started.stop);
		}
	} catch (error) {
		for (const stop of stops) await stop().catch(() => {});
		throw error;
	}
	return {
		env,
		async stopAll() {
			for (const stop of stops) {
				try {
					await stop();
				} catch (error) {
					process.stderr.write(`stopping a service failed: ${error instanceof Error ? error.message : String(error)}\n`);
				}
			}
		}
	};
}

/** The demo sign-ins, read from src/lib/server/seed/demo-users.ts through tsx. */
export async function demoSignIns(env) {
	const out = await capture('listing the demo sign-ins', bin('tsx'), ['scripts/seed.ts', '--print-demo-users'], { env });
	return JSON.parse(out);
}

/** The environment of the built app server (adapter-node) for a port, database env and options. */
export function appServerEnv({ port, dbEnv, demo, authSecret }) {
	const maxUpload = Number(process.env.MAX_UPLOAD_BYTES) || 20 * 1024 * 1024;
	return {
		...process.env,
		...dbEnv,
		NODE_ENV: 'production',
		HOST: '127.0.0.1',
		PORT: String(port),
		ORIGIN: process.env.ORIGIN || `http://127.0.0.1:${port}`,
		AUTH_TRUST_HOST: process.env.AUTH_TRUST_HOST || 'true',
		AUTH_SECRET: authSecret,
		DEMO: demo ? '1' : '0',
		// adapter-node refuses bodies over 512 kB by default; uploads may be as large as MAX_UPLOAD_BYTES.
		BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT || String(maxUpload + 1024 * 1024)
	};
}

async function main() {
	prepare({ browser: false });
	const port = portFrom(process.env.PORT, 3000, 'PORT');
	if (await db.portInUse(port)) {
		throw new UserFacingError(`Port ${port} on 127.0.0.1 is already in use. Stop that program or choose another: PORT=3001 npm start`);
	}
	const demo = process.env.DEMO === undefined ? true : ['1', 'true'].includes(process.env.DEMO);
	const databaseName = process.env.DB_NAME || db.APP_DATABASE;
	const services = await startServices({ mode: 'start', databaseName });
	const env = { ...process.env, ...services.env };

	say('migrating');
	await runOrThrow('migrate', bin('tsx'), ['scripts/migrate.ts', 'up'], { env });
	if (demo) {
		await runOrThrow('loading the demo data', bin('tsx'), ['scripts/seed.ts', '--if-empty'], { env });
	} else {
		say('DEMO is off: no demo data is loaded');
	}

	say('building (vite build)');
	await runOrThrow('vite build', bin('vite'), ['build'], { env: { ...env, NODE_ENV: 'production' } });

	const authSecret = process.env.AUTH_SECRET || persistedSecret('auth-secret');
	const serverEnv = appServerEnv({ port, dbEnv: services.env, demo, authSecret });
	const server = spawn(process.execPath, ['build'], { cwd: ROOT, env: serverEnv, stdio: 'inherit' });
	runningChildren.add(server);
	let stopping = false;
	const stopServer = (signal) => {
		if (stopping) return;
		stopping = true;
		say(`stopping the app server (${signal}); the database keeps running — npm run db:stop stops it`);
		server.kill('SIGTERM');
	};
	process.on('SIGINT', () => stopServer('SIGINT'));
	process.on('SIGTERM', () => stopServer('SIGTERM'));
	server.once('exit', (code, signal) => {
		process.exitCode = stopping ? 0 : (code ?? 1);
		if (!stopping) say(`the app server exited (${signal ?? code})`);
	});

	const url = serverEnv.ORIGIN;
	await waitForHttp(`http://127.0.0.1:${port}/`, server);
	const lines = ['', `Loopledger is running at ${url}`, ''];
	if (demo) {
		const users = await demoSignIns(env);
		lines.push('Demo sign-ins (DEMO=1):');
		for (const u of users) lines.push(`  ${u.role.padEnd(9)} ${u.email.padEnd(32)} ${u.password}   ${u.name}, ${u.duty}`);
		lines.push('');
	}
	lines.push('Predictions come from models: follow site procedures before changing a live loop.');
	lines.push('Ctrl-C stops the app server; npm run db:stop stops the database.', '');
	process.stdout.write(`${lines.join('\n')}\n`);
}

if (isMain(import.meta.url)) {
	main().catch((error) => {
		const message = error instanceof UserFacingError ? error.message : (error?.stack ?? String(error));
		process.stderr.write(`[start] ${message}\n`);
		for (const child of runningChildren) child.kill('SIGTERM');
		process.exit(1);
	});
}
