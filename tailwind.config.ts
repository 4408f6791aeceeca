import type { Config } from 'tailwindcss';

/**
 * Headroom's theme. Colours are CSS variables (defined in src/app.css for the light and dark
 * themes) so one class works in both; verdict colours are named for what they mean.
 */
const v = (name: string) => `var(--hr-${name})`;

export default {
	content: ['./src/**/*.{html,js,svelte,ts}'],
	theme: {
		extend: {
			colors: {
				canvas: v('canvas'),
				surface: v('surface'),
				raised: v('raised'),
				line: v('line'),
				ink: { DEFAULT: v('ink'), soft: v('ink-soft'), faint: v('ink-faint') },
				brand: { DEFAULT: v('brand'), strong: v('brand-strong'), tint: v('brand-tint') },
				accent: v('accent'),
				verdict: {
					compliant: v('verdict-compliant'),
					noncompliant: v('verdict-noncompliant'),
					covered: v('verdict-covered'),
					unstable: v('verdict-unstable'),
					pending: v('verdict-pending'),
					rejected: v('verdict-rejected'),
					empty: v('verdict-empty')
				}
			},
			fontFamily: {
				sans: ['"IBM Plex Sans"', 'system-ui', 'sans-serif'],
				mono: ['"IBM Plex Mono"', 'ui-monospace', 'monospace']
			},
			borderRadius: { card: '0.625rem' }
		}
	}
} satisfies Config;
