/**
 * Rational blocks as numerator/denominator polynomials (ascending) in the block's own variable,
 * s or z; roots are kept when the block states them, so later stages need not recompute them.
 */
import type { Realisation } from './cascade';
import { stateSpaceFactor } from './state-space';
import { add, fromDescending, fromRoots, mul, scale, trim, type Poly } from './polynomial';
import { shiftTo } from './shifted';
import type { Roots } from './roots';
import type { FactoredBlock, PidBlock, PolynomialBlock, StateSpaceBlock } from './schema';

export interface Factor {
	num: Poly;
	den: Poly;
	zeros?: Roots;
	poles?: Roots;
	/** The block's own state-space realisation, when it came as one (the hold uses it as given). */
	realisation?: Realisation;
	/** Sampled factors: num and den in powers of w = z − 1, exact where the z-coefficients are not. */
	numW?: Poly;
	denW?: Poly;
}

export type RationalBlock = PolynomialBlock | FactoredBlock | StateSpaceBlock | PidBlock;

/** `sampled`: the block is in z (not a continuous block about to be discretised). */
export function rationalFactor(block: RationalBlock, sampled = false): Factor {
	switch (block.type) {
		case 'polynomial': {
			const num = fromDescending(block.numerator);
			const den = fromDescending(block.denominator);
			// the file's z-coefficients are exact: shifted exactly, they hold everything near z = 1
			return sampled
				? { num, den, numW: trim(shiftTo(num, 1)), denW: trim(shiftTo(den, 1)) }
				: { num, den };
		}
		case 'factored':
			return factored(block);
		case 'state-space':
			return stateSpaceFactor(block, sampled);
		case 'pid':
			return pid(block);
	}
}

/** A root as written in the file. */
export const rootOf = (r: number | [number, number]): [number, number] =>
	typeof r === 'number' ? [r, 0] : r;

/**
 * Only the upper member of each conjugate pair is read (its partner was checked to exist), so the
 * roots and the coefficients are exactly conjugate-symmetric.
 */
export function rootList(list: readonly (number | [number, number])[] | undefined): Roots {
	const re: number[] = [];
	const im: number[] = [];
	for (const r of list ?? []) {
		const [a, b] = rootOf(r);
		if (b === 0) {
			re.push(a);
			im.push(0);
		} else if (b > 0) {
			re.push(a, a);
			im.push(b, -b);
		}
	}
	return { re: Float64Array.from(re), im: Float64Array.from(im) };
}

function factored(block: FactoredBlock): Factor {
	const zeros = rootList(block.zeros);
	const poles = rootList(block.poles);
	return {
		num: fromRoots(zeros.re, zeros.im, block.gain ?? 1),
		den: fromRoots(poles.re, poles.im),
		zeros,
		poles
	};
}

function pid(block: PidBlock): Factor {
	const kp = block.kp ?? 0;
	const ki = block.ki ?? 0;
	const kd = block.kd ?? 0;
	const tf = block.derivativeFilterSeconds ?? 0;
	// only the terms present enter, so a PD or P block gets no integrator pole cancelled by a zero at 0
	const integral = ki !== 0;
	const filter = kd !== 0 && tf > 0;
	const integrator = integral ? [0, 1] : [1];
	const lag = filter ? [1, tf] : [1];
	const den = mul(integrator, lag);
	let num = scale(den, kp);
	if (integral) num = add(num, scale(lag, ki));
	if (kd !== 0) num = add(num, scale(mul([0, 1], integrator), kd));
	const pre: number[] = [];
	if (integral) pre.push(0);
	if (filter) pre.push(-1 / tf);
	return {
		num: trim(num),
		den,
		poles: { re: Float64Array.from(pre), im: new Float64Array(pre.length) }
	};
}
