/**
 * The periodic box: rectangular, sides lx, ly, lz (length units), home cell [0,lx)×[0,ly)×[0,lz).
 */

export interface Box {
  readonly lx: number;
  readonly ly: number;
  readonly lz: number;
}

/** Makes a box from one side (cubic) or three sides; throws a RangeError naming a side that is not > 0. */
export function boxMake(lx: number, ly: number = lx, lz: number = lx): Box {
  for (const [name, v] of [['Lx', lx], ['Ly', ly], ['Lz', lz]] as const) {
    if (!(v > 0) || !Number.isFinite(v)) throw new RangeError(`box side ${name} must be a positive finite number, got ${v}`);
  }
  return { lx, ly, lz };
}

/** Box volume lx·ly·lz. */
export function boxVolume(box: Box): number {
  return box.lx * box.ly * box.lz;
}

/** Box sides as an array [lx, ly, lz]. */
export function boxSides(box: Box): [number, number, number] {
  return [box.lx, box.ly, box.lz];
}

/** Wraps one coordinate into [0, l). */
export function wrapCoordinate(x: number, l: number): number {
  let w = x - Math.floor(x / l) * l;
  if (w >= l) w -= l; // rounding can land exactly on l
  if (w < 0) w = 0;
  return w;
}

/**
 * Wraps positions (flat xyz, length units) into the home cell in place; returns how many particles moved.
 */
export function positionsWrap(positions: Float64Array, box: Box): number {
  const sides = boxSides(box);
  let moved = 0;
  for (let i = 0; i < positions.length; i += 3) {
    let changed = false;
    for (let d = 0; d < 3; d++) {
      const x = positions[i + d];
      const l = sides[d];
      if (x < 0 || x >= l) {
        positions[i + d] = wrapCoordinate(x, l);
        changed = true;
      }
    }
    if (changed) moved++;
  }
  return moved;
}

/** Minimum-image separation of a component: d wrapped into [−l/2, l/2). */
export function minimumImage(d: number, l: number): number {
  return d - l * Math.round(d / l);
}
