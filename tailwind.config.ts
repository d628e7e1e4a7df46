import type { Config } from 'tailwindcss';

// Padbridge design tokens. Components use these names, never raw hex values.
// panel: dark slate for chrome and text; film: ACF amber for primary actions; glass: teal for
// links and information; bond: green for allowed/valid; open: red for denied/expired;
// superseded: neutral grey for superseded and inactive things.
export default {
	content: ['./src/**/*.{html,svelte,ts,md}', './content/**/*.md'],
	theme: {
		extend: {
			colors: {
				panel: {
					50: '#f4f6f8',
					100: '#e6eaef',
					200: '#cbd3dc',
					300: '#a3b0be',
					400: '#74849a',
					500: '#55657b',
					600: '#425064',
					700: '#343f50',
					800: '#232b37',
					900: '#161c25',
					950: '#0d1118'
				},
				film: {
					50: '#fff8eb',
					100: '#feecc7',
					200: '#fdd68a',
					300: '#fcbb4d',
					400: '#f9a123',
					500: '#e5830b',
					600: '#c26306',
					700: '#9a4609',
					800: '#7d380e',
					900: '#672f0f'
				},
				glass: {
					50: '#effbfa',
					100: '#d5f4f1',
					200: '#aee8e3',
					300: '#78d5ce',
					400: '#43b9b3',
					500: '#299d98',
					600: '#1f7e7b',
					700: '#1d6564',
					800: '#1c5151',
					900: '#1b4444'
				},
				bond: {
					50: '#effaf2',
					100: '#d7f3de',
					200: '#b1e6c1',
					500: '#2f9a55',
					600: '#227d43',
					700: '#1d6338',
					800: '#1a4f2f'
				},
				open: {
					50: '#fdf2f2',
					100: '#fbe1e1',
					200: '#f6c6c6',
					500: '#d43c3c',
					600: '#b82a2a',
					700: '#972424',
					800: '#7c2323'
				},
				superseded: {
					50: '#f6f6f6',
					100: '#e7e7e7',
					300: '#b0b0b0',
					500: '#7a7a7a',
					600: '#636363',
					700: '#4f4f4f'
				}
			},
			fontFamily: {
				sans: [
					'"Atkinson Hyperlegible Next"',
					'"Noto Sans SC"',
					'"Noto Sans KR"',
					'system-ui',
					'sans-serif'
				],
				mono: [
					'"Atkinson Hyperlegible Mono"',
					'"Noto Sans SC"',
					'"Noto Sans KR"',
					'ui-monospace',
					'monospace'
				]
			},
			fontSize: {
				floor: ['1.125rem', { lineHeight: '1.6' }]
			},
			minHeight: { touch: '44px' },
			minWidth: { touch: '44px' }
		}
	}
} satisfies Config;
