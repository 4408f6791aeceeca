/**
 * The demo scenario: Veldmark Drive Systems, an invented maker of the "Tarn" line of drives
 * and motion stages (no real company). Targets follow common practice for each kind of loop
 * (see the README's demo section); model files for the loops are in fixtures/demo/.
 */
import type { Targets } from '../../compliance/criteria';

export type DemoUser = 'engineer' | 'lead' | 'admin';

export const DEMO_COMPANY = 'Veldmark Drive Systems';

export const DEMO_PRODUCTS = [
	{ key: 'tarn-s2', name: 'Tarn S2 dual-axis servo drive' },
	{ key: 'tarn-sp7', name: 'Tarn SP7 spindle drive' },
	{ key: 'tarn-af40', name: 'Tarn AF40 active front end' },
	{ key: 'tarn-m1', name: 'Tarn M1 linear motion stage' }
];

export interface DemoVersion {
	daysAgo: number;
	author: DemoUser;
	reason: string;
	targets: Targets;
}
export interface DemoClass {
	key: string;
	name: string;
	description: string;
	openUploads?: boolean;
	versions: DemoVersion[];
}

export const DEMO_CLASSES: DemoClass[] = [
	{
		key: 'current',
		name: 'Current loop',
		description: 'Inner PI current loops of the drives, 8–16 kHz PWM. Crossover about a tenth of the switching frequency.',
		versions: [
			{ daysAgo: 240, author: 'lead', reason: 'Initial targets from the drive design guide.', targets: { minUpperGainMarginDb: '8', minPhaseMarginDeg: '45', crossoverMinHz: '300', crossoverMaxHz: '2500' } },
			{ daysAgo: 75, author: 'lead', reason: 'Audible current ringing on S2 field units at 45°: phase margin raised to 50° and a modulus margin added.', targets: { minUpperGainMarginDb: '8', minPhaseMarginDeg: '50', minModulusMargin: '0.5', crossoverMinHz: '300', crossoverMaxHz: '2500' } }
		]
	},
	{
		key: 'speed',
		name: 'Speed loop',
		description: 'PI speed loops around the current loop, every inertia case from motor only to fully coupled load.',
		versions: [
			{ daysAgo: 240, author: 'lead', reason: 'Initial targets from the drive design guide.', targets: { minUpperGainMarginDb: '6', minPhaseMarginDeg: '45', maxPeakSensitivity: '2', crossoverMinHz: '10', crossoverMaxHz: '300' } }
		]
	},
	{
		key: 'position',
		name: 'Position loop',
		description: 'Outer position loops of servo axes and stages; the delay margin covers bus and interpolation jitter.',
		versions: [
			{ daysAgo: 240, author: 'lead', reason: 'Initial targets from the drive design guide.', targets: { minUpperGainMarginDb: '6', minPhaseMarginDeg: '45', minDelayMarginSeconds: '0.002' } },
			{ daysAgo: 30, author: 'admin', reason: 'EtherCAT cycle jitter measured at up to 0.8 ms on M1 controllers: delay margin target doubled to 4 ms, phase margin to 50°.', targets: { minUpperGainMarginDb: '6', minPhaseMarginDeg: '50', minDelayMarginSeconds: '0.004' } }
		]
	},
	{
		key: 'dc-link',
		name: 'DC-link voltage loop',
		description: 'Outer voltage loops of active front ends and regenerative braking; capacitor ageing is a case.',
		versions: [
			{ daysAgo: 200, author: 'lead', reason: 'Initial targets agreed with the power-electronics team.', targets: { minUpperGainMarginDb: '6', minPhaseMarginDeg: '45', minModulusMargin: '0.5', crossoverMinHz: '5', crossoverMaxHz: '100' } }
		]
	},
	{
		key: 'pll',
		name: 'Grid PLL',
		description: 'Synchronous-reference-frame PLLs of grid-tied converters, over the grid-strength cases.',
		versions: [
			{ daysAgo: 200, author: 'lead', reason: 'Initial targets agreed with the power-electronics team.', targets: { minUpperGainMarginDb: '6', minPhaseMarginDeg: '45', minDiskGainMarginDb: '4', crossoverMinHz: '5', crossoverMaxHz: '60' } }
		]
	},
	{
		key: 'temperature',
		name: 'Temperature loop',
		description: 'Slow coolant and heatsink temperature loops with dead time; process-loop margins (gain margin 1.7 = 4.6 dB).',
		openUploads: true,
		versions: [
			{ daysAgo: 180, author: 'lead', reason: 'Process-loop targets: gain margin ratio 1.7 (4.6 dB), phase margin 30°.', targets: { minUpperGainMarginDb: '4.6', minPhaseMarginDeg: '30', minDelayMarginSeconds: '5' } }
		]
	}
];

export interface DemoLoop {
	product: string;
	key: string;
	class: string;
	name: string;
	owner: DemoUser;
	tags?: string[];
	note?: string;
}

const L = (product: string, key: string, cls: string, name: string, owner: DemoUser, tags: string[] = [], note = ''): DemoLoop => ({ product, key, class: cls, name, owner, tags, note });

export const DEMO_LOOPS: DemoLoop[] = [
	L('tarn-s2', 'ax1-id', 'current', 'Axis 1 d-axis current', 'engineer', ['axis-1']),
	L('tarn-s2', 'ax1-iq', 'current', 'Axis 1 q-axis current', 'engineer', ['axis-1']),
	L('tarn-s2', 'ax2-id', 'current', 'Axis 2 d-axis current', 'engineer', ['axis-2']),
	L('tarn-s2', 'ax2-iq', 'current', 'Axis 2 q-axis current', 'engineer', ['axis-2', 'bandwidth-trial'], 'Raised to 1.3 kHz for the fast-indexing option.'),
	L('tarn-s2', 'ax1-speed', 'speed', 'Axis 1 speed', 'engineer', ['axis-1']),
	L('tarn-s2', 'ax2-speed', 'speed', 'Axis 2 speed (long-belt variant)', 'engineer', ['axis-2', 'belt'], 'Belt resonance near 410 Hz; notch tuning planned for firmware 2.4.'),
	L('tarn-s2', 'ax1-pos', 'position', 'Axis 1 position', 'lead', ['axis-1']),
	L('tarn-s2', 'ax2-pos', 'position', 'Axis 2 position', 'lead', ['axis-2']),
	L('tarn-s2', 'heatsink-temp', 'temperature', 'Heatsink temperature (fan)', 'admin', ['thermal']),
	L('tarn-sp7', 'id', 'current', 'Spindle d-axis current', 'engineer', ['sampled']),
	L('tarn-sp7', 'iq', 'current', 'Spindle q-axis current', 'engineer', ['sampled']),
	L('tarn-sp7', 'speed', 'speed', 'Spindle speed (rig sweep)', 'engineer', ['measured', 'rig-a']),
	L('tarn-sp7', 'speed-fw', 'speed', 'Spindle speed in field weakening', 'engineer', ['field-weakening']),
	L('tarn-sp7', 'orient', 'position', 'Spindle orientation', 'lead', []),
	L('tarn-sp7', 'dc-link', 'dc-link', 'DC link during regenerative braking', 'lead', ['braking']),
	L('tarn-sp7', 'coolant-temp', 'temperature', 'Spindle coolant temperature', 'admin', ['thermal'], 'Retuned for faster warm-up; check the gain margin.'),
	L('tarn-af40', 'grid-id', 'current', 'Grid d-axis current', 'engineer', ['grid']),
	L('tarn-af40', 'grid-iq', 'current', 'Grid q-axis current', 'engineer', ['grid']),
	L('tarn-af40', 'dc-link', 'dc-link', 'DC-link voltage', 'lead', ['grid']),
	L('tarn-af40', 'pll', 'pll', 'Grid synchronisation PLL', 'lead', ['grid']),
	L('tarn-af40', 'pll-weak-grid', 'pll', 'PLL, weak-grid gain set', 'lead', ['grid', 'weak-grid']),
	L('tarn-af40', 'coolant-temp', 'temperature', 'Coolant temperature (pump speed)', 'admin', ['thermal']),
	L('tarn-m1', 'x-current', 'current', 'X motor current', 'engineer', ['axis-x']),
	L('tarn-m1', 'y-current', 'current', 'Y motor current', 'engineer', ['axis-y']),
	L('tarn-m1', 'z-current', 'current', 'Z motor current', 'engineer', ['axis-z']),
	L('tarn-m1', 'x-speed', 'speed', 'X velocity', 'engineer', ['axis-x']),
	L('tarn-m1', 'y-speed', 'speed', 'Y velocity', 'engineer', ['axis-y']),
	L('tarn-m1', 'z-speed', 'speed', 'Z velocity', 'engineer', ['axis-z'], 'Notch filter parameters lost in the 2.3 parameter migration.'),
	L('tarn-m1', 'x-pos', 'position', 'X position', 'lead', ['axis-x']),
	L('tarn-m1', 'y-pos', 'position', 'Y position', 'lead', ['axis-y']),
	L('tarn-m1', 'z-pos', 'position', 'Z position', 'lead', ['axis-z']),
	L('tarn-m1', 'stage-temp', 'temperature', 'Granite base temperature', 'admin', ['thermal'])
];

export interface DemoDeviation {
	product: string;
	loop: string;
	criteria: string[];
	relaxed: Targets;
	reason: string;
	startsDaysAgo: number;
	/** Negative: already expired. */
	expiresInDays: number;
}

export const DEMO_DEVIATIONS: DemoDeviation[] = [
	{
		product: 'tarn-s2',
		loop: 'ax2-speed',
		criteria: ['phaseMargin'],
		relaxed: { minPhaseMarginDeg: '38' },
		reason: 'Belt resonance of the long-belt variant costs phase; accepted until the notch filter of firmware 2.4 is released.',
		startsDaysAgo: 20,
		expiresInDays: 70
	},
	{
		product: 'tarn-af40',
		loop: 'pll-weak-grid',
		criteria: ['phaseMargin'],
		relaxed: { minPhaseMarginDeg: '35' },
		reason: 'Field trial on a weak grid (SCR 1.5) with the fast gain set; trial ended.',
		startsDaysAgo: 150,
		expiresInDays: -30
	}
];
