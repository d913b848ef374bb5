// Minimal typings for jstat 1.9.6, which ships no TypeScript declarations.
// Only the members this folder uses are declared. The package is CommonJS
// (`module.exports = jStat`), so it is imported as a default export.
declare module 'jstat' {
	interface JStatStatic {
		hypgeom: {
			/** P(K = k) drawing n items from a population of N with m successes. */
			pdf(k: number, N: number, m: number, n: number): number;
			cdf(k: number, N: number, m: number, n: number): number;
		};
		studentt: {
			inv(p: number, dof: number): number;
			cdf(x: number, dof: number): number;
		};
		/** Complementary error function. */
		erfc(x: number): number;
		normal: {
			cdf(x: number, mean: number, sd: number): number;
			inv(p: number, mean: number, sd: number): number;
		};
		chisquare: {
			cdf(x: number, dof: number): number;
		};
	}
	const jStat: JStatStatic;
	export default jStat;
}
