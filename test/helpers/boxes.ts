/** Axis-aligned boxes (x, y, width, height, as Playwright's boundingBox gives them). */
export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** True when the two boxes share any area (touching edges do not count). */
export function boxesOverlap(a: Box, b: Box): boolean {
  return a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
}
