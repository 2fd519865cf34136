import { bench, describe } from 'vitest';
import { tuneAll } from './tuning';
import { ultimateRational } from './ultimate';
import { designController } from './design';
import { convertController } from './conversions';

// The bench recomputes on every slider move (target: a full recompute well under 16 ms).
describe('tuning part of the engine', () => {
	bench('tuneAll, SOPDT, PID (12 rules, exact-delay Ku)', () => {
		tuneAll({ structure: 'sopdt', k: 2, tau: 5, tau2: 2, theta: 1 }, 'PID');
	});
	bench('tuneAll, FOPDT, PI', () => {
		tuneAll({ structure: 'fopdt', k: 1.2, tau: 4, theta: 0.8 }, 'PI');
	});
	bench('ultimateRational, 3rd-order lead/lag with delay', () => {
		ultimateRational([0.5, 1], [0.6, 2.9, 3.3, 1], 0.4);
	});
	bench('designController, PID on two lags', () => {
		designController({ plant: { structure: 'sopdt', k: 1, tau: 4, tau2: 1 }, controller: 'PID', target: { zeta: 0.7, wn: 3 } });
	});
	bench('convertController, series → parallel', () => {
		convertController({ type: 'PID', form: 'series', kp: 1.3, ti: 2, td: 1.2, n: 10 }, 'parallel');
	});
});
