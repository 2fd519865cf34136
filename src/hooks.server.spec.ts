/**
 * The error hook: unexpected errors are logged with a short reference id and the person sees a
 * plain message quoting the same id (never the error's own text); 404s stay plain.
 */
import { describe, expect, it, vi } from 'vitest';
import { handleError } from './hooks.server';

function fakeEvent(path: string) {
	return { request: new Request(`http://127.0.0.1${path}`), url: new URL(`http://127.0.0.1${path}`) } as never;
}

describe('handleError', () => {
	it('logs the error with an id and shows only a plain message with that id', async () => {
		const log = vi.spyOn(console, 'error').mockImplementation(() => {});
		try {
			const secret = new Error('connect ECONNREFUSED 127.0.0.1:3307 password=hunter2');
			const result = (await handleError({ error: secret, event: fakeEvent('/register'), status: 500, message: 'Internal Error' })) as {
				message: string;
				errorId: string;
			};
			expect(result.errorId).toMatch(/^[0-9a-f]{8}$/);
			expect(result.message).toBe(`Something went wrong on our side. Quote reference ${result.errorId} when you report it.`);
			expect(result.message).not.toContain('hunter2');
			expect(log).toHaveBeenCalledTimes(1);
			const [line, logged] = log.mock.calls[0];
			expect(line).toContain(`[error ${result.errorId}] GET /register`);
			expect(logged).toBe(secret);
		} finally {
			log.mockRestore();
		}
	});
	it('gives each error its own id', async () => {
		const log = vi.spyOn(console, 'error').mockImplementation(() => {});
		try {
			const ids = new Set<string>();
			for (let i = 0; i < 20; i++) {
				const r = (await handleError({ error: new Error('x'), event: fakeEvent('/'), status: 500, message: 'Internal Error' })) as { errorId: string };
				ids.add(r.errorId);
			}
			expect(ids.size).toBe(20);
		} finally {
			log.mockRestore();
		}
	});
	it('keeps 404s plain and unlogged', async () => {
		const log = vi.spyOn(console, 'error').mockImplementation(() => {});
		try {
			expect(await handleError({ error: new Error('nope'), event: fakeEvent('/nowhere'), status: 404, message: 'Not Found' })).toEqual({ message: 'Not found.' });
			expect(log).not.toHaveBeenCalled();
		} finally {
			log.mockRestore();
		}
	});
});
