// Seeded random helpers for the demo generator. Every item gets its own stream,
// named by the run seed and the item (e.g. "1/positive/17"), so item 17 is the same
// picture whether the run makes 20 positives or 1,200.
import seedrandom from 'seedrandom';

/** A seeded stream of numbers with the few shapes the generator needs. */
export function makeRandom(name) {
  const next = seedrandom(String(name));
  let spareNormal = null;
  return {
    /** Uniform in [low, high). */
    uniform(low = 0, high = 1) {
      return low + (high - low) * next();
    },
    /** Integer in [low, high], both ends included. */
    integer(low, high) {
      return low + Math.floor(next() * (high - low + 1));
    },
    /** True with probability p. */
    chance(p) {
      return next() < p;
    },
    /** One element of a non-empty array. */
    pick(items) {
      return items[Math.floor(next() * items.length)];
    },
    /** Standard normal by the Box–Muller transform (Box & Muller 1958), caching the second value. */
    normal() {
      if (spareNormal !== null) {
        const value = spareNormal;
        spareNormal = null;
        return value;
      }
      const u = 1 - next(); // in (0, 1], so the logarithm is finite
      const v = next();
      const radius = Math.sqrt(-2 * Math.log(u));
      spareNormal = radius * Math.sin(2 * Math.PI * v);
      return radius * Math.cos(2 * Math.PI * v);
    },
  };
}
