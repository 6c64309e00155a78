/**
 * Type declarations for the data modules of the npm package astronomia 4.2.0 (it ships no types).
 * VSOP87 files: { L, B, R } each keyed by power of time "0".."5", rows [A, B, C] meaning A·cos(B + C·τ),
 * τ in Julian millennia TDB from J2000. ELP/MPP02 files: { W1, L, B, R }, rows [A, φ0, φ1, φ2, φ3, φ4]
 * meaning A·sin(φ0 + φ1·T + … + φ4·T⁴), T in Julian centuries TDB from J2000; L and B in arcseconds,
 * R in km; W1 the mean longitude polynomial in radians.
 */
type AstronomiaVsop87Data = {
  name?: string;
  type?: string;
  L: Record<string, number[][]>;
  B: Record<string, number[][]>;
  R: Record<string, number[][]>;
};
type AstronomiaElpData = {
  name: string;
  W1: number[];
  L: Record<string, number[][]>;
  B: Record<string, number[][]>;
  R: Record<string, number[][]>;
};
declare module 'astronomia/data/vsop87Bmercury' { const d: AstronomiaVsop87Data; export default d; }
declare module 'astronomia/data/vsop87Bvenus' { const d: AstronomiaVsop87Data; export default d; }
declare module 'astronomia/data/vsop87Bearth' { const d: AstronomiaVsop87Data; export default d; }
declare module 'astronomia/data/vsop87Bmars' { const d: AstronomiaVsop87Data; export default d; }
declare module 'astronomia/data/vsop87Bjupiter' { const d: AstronomiaVsop87Data; export default d; }
declare module 'astronomia/data/vsop87Bsaturn' { const d: AstronomiaVsop87Data; export default d; }
declare module 'astronomia/data/vsop87Buranus' { const d: AstronomiaVsop87Data; export default d; }
declare module 'astronomia/data/vsop87Bneptune' { const d: AstronomiaVsop87Data; export default d; }
declare module 'astronomia/data/elpMppDe' { const d: AstronomiaElpData; export default d; }
