/**
 * Collision detection composed from simpler detectors: the first one that finds anything wins.
 * The board asks dnd-kit's pointerWithin first (the still row under the pointer) and falls back
 * to rectIntersection (the row the dragged block overlaps most) for keyboard and touch drags,
 * which have no pointer over a row.
 */
export function firstHit<Args, Hit>(first: (args: Args) => Hit[], ...rest: Array<(args: Args) => Hit[]>): (args: Args) => Hit[] {
  return (args) => {
    let hits = first(args);
    for (const next of rest) {
      if (hits.length) return hits;
      hits = next(args);
    }
    return hits;
  };
}
