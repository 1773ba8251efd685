// Multiply-add on f64x2 lanes for the kernels. scripts/build-wasm.mjs compiles the kernels twice: with
// relaxed SIMD these are fused (one rounding, where the CPU has FMA), otherwise a multiply and an add.
// The two builds differ in the last bits only (tests hold all kernel paths to the same checks).

/** a·b + c */
@inline export function madd(a: v128, b: v128, c: v128): v128 {
  if (ASC_FEATURE_RELAXED_SIMD) return f64x2.relaxed_madd(a, b, c);
  return f64x2.add(f64x2.mul(a, b), c);
}

/** c − a·b */
@inline export function nmadd(a: v128, b: v128, c: v128): v128 {
  if (ASC_FEATURE_RELAXED_SIMD) return f64x2.relaxed_nmadd(a, b, c);
  return f64x2.sub(c, f64x2.mul(a, b));
}
