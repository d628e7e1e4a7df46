import { rgb, type RGB } from 'pdf-lib';

// These mirror the colour tokens in tailwind.config.ts (panel, film, glass, bond, open); keep
// them in step.
const TOKEN_HEX = {
	'panel-50': '#f4f6f8',
	'panel-100': '#e6eaef',
	'panel-200': '#cbd3dc',
	'panel-500': '#55657b',
	'panel-700': '#343f50',
	'panel-900': '#161c25',
	'film-100': '#feecc7',
	'film-500': '#e5830b',
	'film-700': '#9a4609',
	'glass-700': '#1d6564',
	'bond-700': '#1d6338',
	'open-700': '#972424'
} as const;

export type Token = keyof typeof TOKEN_HEX;

/** A design token as a pdf-lib colour. */
export function tokenRgb(token: Token): RGB {
	const hex = TOKEN_HEX[token];
	const channel = (at: number) => parseInt(hex.slice(at, at + 2), 16) / 255;
	return rgb(channel(1), channel(3), channel(5));
}
