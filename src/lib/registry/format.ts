/** Short readable forms of targets for lists: "PM ≥ 50°", "Ms ≤ 2", "crossover 300–2500 Hz". */
import { FIELD_INFO, type TargetKey } from './targets';
import type { Targets } from '../compliance/criteria';

const SHORT: Record<TargetKey, string> = {
	minUpperGainMarginDb: 'GM',
	minLowerGainMarginDb: 'lower GM',
	minPhaseMarginDeg: 'PM',
	minDelayMarginSeconds: 'delay',
	minDelayMarginSamples: 'delay',
	minModulusMargin: 'modulus',
	maxPeakSensitivity: 'Ms',
	minDiskGainMarginDb: 'disk GM',
	crossoverMinHz: '',
	crossoverMaxHz: ''
};

const unit = (k: TargetKey) => {
	const u = FIELD_INFO[k].unit;
	return u === '°' ? '°' : u ? ` ${u}` : '';
};

export function targetSummary(t: Targets): string[] {
	const out: string[] = [];
	for (const k of Object.keys(SHORT) as TargetKey[]) {
		const v = t[k];
		if (!v || k === 'crossoverMinHz' || k === 'crossoverMaxHz') continue;
		out.push(`${SHORT[k]} ${FIELD_INFO[k].kind === 'min' ? '≥' : '≤'} ${v}${unit(k)}`);
	}
	if (t.crossoverMinHz || t.crossoverMaxHz) out.push(`crossover ${t.crossoverMinHz ?? '0'}–${t.crossoverMaxHz ?? '∞'} Hz`);
	return out;
}

export const formatDate = (iso: string | null) => (iso ? iso.slice(0, 10) : '—');
export const formatDateTime = (iso: string | null) => (iso ? `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC` : '—');
