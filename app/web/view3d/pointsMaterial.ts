/**
 * Round points with per-vertex colour (or one colour for all, which spares a colour buffer), a size in
 * pixels and the slab filter, as a small shader.
 */
import * as THREE from 'three';

const vertex = /* glsl */ `
attribute vec3 color;
uniform float size;
uniform int slabAxis;
uniform float slabMin;
uniform float slabMax;
uniform vec3 tint;
varying vec3 vColor;
void main() {
#ifdef TINT
  vColor = tint;
#else
  vColor = color;
#endif
  if (slabAxis >= 0) {
    float v = slabAxis == 0 ? position.x : (slabAxis == 1 ? position.y : position.z);
    bool inside = slabMin <= slabMax ? (v >= slabMin && v <= slabMax) : (v >= slabMin || v <= slabMax);
    if (!inside) { gl_Position = vec4(2.0, 2.0, 2.0, 1.0); gl_PointSize = 0.0; return; }
  }
  gl_Position = projectionMatrix * modelViewMatrix * vec4(position, 1.0);
  gl_PointSize = size;
}
`;

const fragment = /* glsl */ `
uniform float opacity;
uniform bool ring;
varying vec3 vColor;
void main() {
  vec2 p = gl_PointCoord * 2.0 - 1.0;
  float r = dot(p, p);
  if (r > 1.0) discard;
  if (ring && r < 0.55) discard;
  gl_FragColor = vec4(vColor, opacity);
}
`;

/**
 * A material for THREE.Points whose geometry has `position` and `color` attributes; with `tint` (rgb in
 * 0…1) every point has that colour and the geometry needs no `color`.
 */
export function pointsMaterial(size: number, opacity = 1, ring = false, tint: readonly [number, number, number] | null = null): THREE.ShaderMaterial {
  return new THREE.ShaderMaterial({
    defines: tint ? { TINT: 1 } : {},
    uniforms: {
      size: { value: size },
      opacity: { value: opacity },
      ring: { value: ring },
      slabAxis: { value: -1 },
      slabMin: { value: 0 },
      slabMax: { value: 0 },
      tint: { value: new THREE.Vector3(...(tint ?? [1, 1, 1])) },
    },
    vertexShader: vertex,
    fragmentShader: fragment,
    transparent: opacity < 1,
    depthWrite: opacity >= 1,
  });
}
