// How stages and the analyses over them name a channel element.

/**
 * A channel element (of a stage, or of a dynamic node's neighbourhood) as one number, so that nothing holds an object
 * per device: a transistor is its index into `cell.mosfets` (0 or more), a resistor its index `i` into `cell.others`
 * written as `~i` (below 0).
 */
export type ElementRef = number;

export function mosElement(index: number): ElementRef {
  return index;
}

export function resistorElement(index: number): ElementRef {
  return ~index;
}

export function isMosElement(el: ElementRef): boolean {
  return el >= 0;
}

/** Index into `cell.mosfets` (transistor) or `cell.others` (resistor). */
export function elementIndex(el: ElementRef): number {
  return el >= 0 ? el : ~el;
}
