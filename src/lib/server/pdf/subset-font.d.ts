// subset-font ships no types; this is the part of its API the PDFs use.
declare module 'subset-font' {
	export default function subsetFont(
		font: Uint8Array,
		text: string,
		options?: { targetFormat?: 'sfnt' | 'woff' | 'woff2' | 'truetype'; preserveNameIds?: number[] }
	): Promise<Buffer>;
}
