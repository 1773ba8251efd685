// Summation orders of the plain periodic image sums (public API): set up, chunk over targets, finalize;
// predicted limits; the homogeneous-box field. Internals (multipole.ts, imageShells.ts, slab.ts, screened.ts,
// nearestImage.ts, erfcScaled.ts, extrapolation.ts) are imported by path where needed.
export * from './imageSumOrder';
export * from './imageSumOptions';
export * from './predictedLimit';
export * from './uniformBox';
