// jstat ships no type declarations; only the Poisson functions the tests compare against are typed.
declare module 'jstat' {
	interface PoissonDistribution {
		pdf(k: number, lambda: number): number;
		cdf(x: number, lambda: number): number;
	}
	const jStat: { poisson: PoissonDistribution };
	export default jStat;
}
