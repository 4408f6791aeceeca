/**
 * A sampled loop in powers of w = z − 1: L = gain · N(w)/D(w), each factor contributing its exact
 * shifted coefficients (polynomial blocks, fitted numerators) or the product of its roots written
 * from their precise offsets 1 − r. Built per factor, never by shifting the loop's z-coefficients,
 * whose rounding has already lost what a fast-sampled loop keeps near z = 1.
 */
import type { Factor } from './blocks';
import { fromOffsets } from './circle-fit';
import type { CaseLoop } from './loop';
import { maxAbs, mul, powerOfTwo, scale, type Poly } from './polynomial';
import { shiftTo } from './shifted';
import type { SampledLoopForms } from './crossovers';

/** The z-, w- and delay-free w-forms the sampled crossover search takes. */
export function loopForms(loop: CaseLoop): SampledLoopForms {
	const w = sampledForms(loop);
	return {
		z: { num: loop.num, den: loop.den, gain: loop.gain },
		w,
		undelayed: loop.foldedDelay > 0 ? sampledForms(loop, true) : w
	};
}

export interface SampledForms {
	num: Poly;
	den: Poly;
	gain: number;
}

const lead = (p: Poly) => p[p.length - 1];

function factorForms(f: Factor): [Poly, Poly] {
	const num = f.numW ?? (f.zeros ? scale(fromOffsets(f.zeros), lead(f.num)) : shiftTo(f.num, 1));
	const den = f.denW ?? (f.poles ? scale(fromOffsets(f.poles), lead(f.den)) : shiftTo(f.den, 1));
	return [num, den];
}

/** `skipDelay`: leave out the whole-sample delay folded into den (the last factor). */
export function sampledForms(loop: CaseLoop, skipDelay = false): SampledForms {
	let num: Poly = [1];
	let den: Poly = [1];
	let gain = loop.caseGain;
	const factors = skipDelay && loop.foldedDelay > 0 ? loop.factors.slice(0, -1) : loop.factors;
	for (const f of factors) {
		const [n, d] = factorForms(f);
		num = mul(num, n);
		den = mul(den, d);
		// powers of two keep the products in range without touching their digits
		const sn = powerOfTwo(maxAbs(num));
		const sd = powerOfTwo(maxAbs(den));
		num = num.map((x) => x / sn);
		den = den.map((x) => x / sd);
		gain *= sn / sd;
	}
	return { num, den, gain };
}
