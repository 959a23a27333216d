// Checks at the library's edge. A caller that passes unequal lengths or a NaN has lost track
// of its data; answering with a number (or silently using the shorter side) would hide that.

export function requireFinite(caller: string, values: ArrayLike<number>, name = 'values'): void {
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) {
      throw new RangeError(`${caller}: ${name} must be finite numbers (entry ${i} is ${values[i]})`)
    }
  }
}

export function requireSameLength(caller: string, x: ArrayLike<number>, y: ArrayLike<number>) {
  if (x.length !== y.length) {
    throw new RangeError(`${caller}: x and y must be the same length (${x.length} and ${y.length})`)
  }
}
