/**
 * Run-time configuration, read from process.env once and validated. Secrets are never taken from
 * `$env/static/private` (they would be baked into the build). Relative imports only, so the
 * scripts under `scripts/` (run with tsx) share this module with the server.
 */
import { z } from 'zod';

const bool = z
	.enum(['0', '1', 'true', 'false', ''])
	.optional()
	.transform((v) => v === '1' || v === 'true');

const schema = z.object({
	NODE_ENV: z.string().optional(),
	DEMO: bool,
	DB_HOST: z.string().default('127.0.0.1'),
	DB_PORT: z.coerce.number().int().min(1).max(65535).default(3307),
	DB_NAME: z.string().regex(/^[A-Za-z0-9_]+$/, 'letters, digits and _ only').default('loopledger'),
	DB_USER: z.string().default('loopledger'),
	DB_PASSWORD: z.string().default('loopledger-local'),
	DB_READ_HOSTS: z.string().optional(),
	DB_POOL_MAX: z.coerce.number().int().min(1).max(200).default(10),
	AUTH_SECRET: z.string().optional(),
	ORIGIN: z.string().optional(),
	UPLOAD_DIR: z.string().default('.data/uploads'),
	MAX_UPLOAD_BYTES: z.coerce.number().int().positive().default(20 * 1024 * 1024),
	SMTP_URL: z.string().optional(),
	MAIL_FROM: z.string().default('Loopledger <loopledger@localhost>'),
	/** Port of the local mail catcher on 127.0.0.1 (used when SMTP_URL is empty). */
	SMTP_CATCHER_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
	/** The in-process mail worker runs unless this is 0 (e.g. on app servers that should not send). */
	MAIL_WORKER: z.enum(['0', '1', '']).optional(),
	SIGNIN_MAX_FAILURES: z.coerce.number().int().min(1).default(5),
	SIGNIN_LOCK_SECONDS: z.coerce.number().int().min(1).default(300)
});

export type Env = z.infer<typeof schema>;

let cached: Env | null = null;

/** The validated configuration; throws a readable error naming the bad variable. */
export function env(): Env {
	if (cached) return cached;
	const parsed = schema.safeParse(process.env);
	if (!parsed.success) {
		const issue = parsed.error.issues[0];
		throw new Error(`Configuration error: ${issue.path.join('.')}: ${issue.message}`);
	}
	const value = parsed.data;
	if (!value.DEMO && value.NODE_ENV === 'production' && !value.AUTH_SECRET) {
		throw new Error('Configuration error: AUTH_SECRET is required outside demo mode (DEMO=1).');
	}
	cached = value;
	return value;
}

/** Forget the cached configuration (tests that change process.env). */
export function resetEnvCache(): void {
	cached = null;
}
