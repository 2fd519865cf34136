/**
 * Scalar root finding and minimisation without derivatives, used to refine crossings and
 * peaks located on a grid.
 */

/**
 * Zero of f on [a, b] given f(a)·f(b) ≤ 0, by Brent's method (R. P. Brent, Algorithms for
 * Minimization without Derivatives, Prentice-Hall 1973, ch. 4). Returns null when [a, b] does not
 * bracket a sign change or f is not finite at the ends. Stops when the bracket is below
 * 2ε|x| + tol/2.
 */
export function brentRoot(f: (x: number) => number, a: number, b: number, tol = 0, maxIter = 100): number | null {
	let fa = f(a);
	let fb = f(b);
	if (!Number.isFinite(fa) || !Number.isFinite(fb)) return null;
	if (fa === 0) return a;
	if (fb === 0) return b;
	if (fa > 0 === fb > 0) return null;
	let c = a;
	let fc = fa;
	let d = b - a;
	let e = d;
	for (let it = 0; it < maxIter; it++) {
		if (fb > 0 === fc > 0) {
			c = a;
			fc = fa;
			d = b - a;
			e = d;
		}
		if (Math.abs(fc) < Math.abs(fb)) {
			a = b;
			b = c;
			c = a;
			fa = fb;
			fb = fc;
			fc = fa;
		}
		const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tol;
		const m = 0.5 * (c - b);
		if (Math.abs(m) <= tol1 || fb === 0) return b;
		if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
			// Inverse quadratic interpolation, or the secant step when only two points differ.
			const s = fb / fa;
			let p: number;
			let q: number;
			if (a === c) {
				p = 2 * m * s;
				q = 1 - s;
			} else {
				const qq = fa / fc;
				const r = fb / fc;
				p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
				q = (qq - 1) * (r - 1) * (s - 1);
			}
			if (p > 0) q = -q;
			else p = -p;
			if (2 * p < Math.min(3 * m * q - Math.abs(tol1 * q), Math.abs(e * q))) {
				e = d;
				d = p / q;
			} else {
				d = m;
				e = m;
			}
		} else {
			d = m;
			e = m;
		}
		a = b;
		fa = fb;
		b += Math.abs(d) > tol1 ? d : m > 0 ? tol1 : -tol1;
		fb = f(b);
		if (!Number.isFinite(fb)) return null;
	}
	return b;
}

/**
 * Local minimum of f on [a, b] by Brent's method (golden section with parabolic steps; Brent
 * 1973, ch. 5). Returns the abscissa and value. Relative tolerance about √ε, as Brent advises.
 */
export function brentMinimize(f: (x: number) => number, a: number, b: number, maxIter = 100): { x: number; fx: number } {
	const golden = 0.381966011250105;
	const eps = Math.sqrt(Number.EPSILON);
	let x = a + golden * (b - a);
	let w = x;
	let v = x;
	let fx = f(x);
	let fw = fx;
	let fv = fx;
	let d = 0;
	let e = 0;
	for (let it = 0; it < maxIter; it++) {
		const xm = 0.5 * (a + b);
		const tol1 = eps * Math.abs(x) + 1e-300;
		const tol2 = 2 * tol1;
		if (Math.abs(x - xm) <= tol2 - 0.5 * (b - a)) break;
		let useGolden = true;
		if (Math.abs(e) > tol1) {
			let r = (x - w) * (fx - fv);
			let q = (x - v) * (fx - fw);
			let p = (x - v) * q - (x - w) * r;
			q = 2 * (q - r);
			if (q > 0) p = -p;
			q = Math.abs(q);
			const etemp = e;
			e = d;
			if (!(Math.abs(p) >= Math.abs(0.5 * q * etemp) || p <= q * (a - x) || p >= q * (b - x))) {
				d = p / q;
				const u = x + d;
				if (u - a < tol2 || b - u < tol2) d = xm - x >= 0 ? tol1 : -tol1;
				useGolden = false;
			}
		}
		if (useGolden) {
			e = x >= xm ? a - x : b - x;
			d = golden * e;
		}
		const u = Math.abs(d) >= tol1 ? x + d : x + (d >= 0 ? tol1 : -tol1);
		const fu = f(u);
		if (fu <= fx) {
			if (u >= x) a = x;
			else b = x;
			v = w;
			fv = fw;
			w = x;
			fw = fx;
			x = u;
			fx = fu;
		} else {
			if (u < x) a = u;
			else b = u;
			if (fu <= fw || w === x) {
				v = w;
				fv = fw;
				w = u;
				fw = fu;
			} else if (fu <= fv || v === x || v === w) {
				v = u;
				fv = fu;
			}
		}
	}
	return { x, fx };
}

/**
 * Zero of f on a bracket [a, b] (f(a)·f(b) ≤ 0) by Newton's method safeguarded with bisection:
 * a Newton step that leaves the bracket or shrinks it too slowly is replaced by a bisection
 * (the "rtsafe" strategy; Press et al., Numerical Recipes, 3rd ed., §9.4, idea only). fdf returns
 * [f(x), f′(x)]. Returns null when [a, b] does not bracket a sign change.
 */
export function newtonBracketed(fdf: (x: number) => [number, number], a: number, b: number, relTol = 1e-14, maxIter = 100): number | null {
	let [fa] = fdf(a);
	const [fb] = fdf(b);
	if (!Number.isFinite(fa) || !Number.isFinite(fb)) return null;
	if (fa === 0) return a;
	if (fb === 0) return b;
	if (fa > 0 === fb > 0) return null;
	let lo = a;
	let hi = b;
	// Keep f(lo) < 0 < f(hi) orientation.
	if (fa > 0) {
		lo = b;
		hi = a;
		fa = fb;
	}
	let x = 0.5 * (a + b);
	let dxOld = Math.abs(b - a);
	let dx = dxOld;
	let [f, df] = fdf(x);
	for (let it = 0; it < maxIter; it++) {
		const newtonOut = ((x - hi) * df - f) * ((x - lo) * df - f) > 0;
		const slow = Math.abs(2 * f) > Math.abs(dxOld * df);
		if (!Number.isFinite(df) || df === 0 || newtonOut || slow) {
			dxOld = dx;
			dx = 0.5 * (hi - lo);
			x = lo + dx;
		} else {
			dxOld = dx;
			dx = f / df;
			x -= dx;
		}
		if (Math.abs(dx) <= relTol * Math.abs(x) || Math.abs(dx) < 1e-300) return x;
		[f, df] = fdf(x);
		if (!Number.isFinite(f)) return null;
		if (f === 0) return x;
		if (f < 0) lo = x;
		else hi = x;
	}
	return x;
}
