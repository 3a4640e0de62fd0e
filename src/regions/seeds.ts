/**
 * The seed of each region's fit, derived from the run seed and the region's NAME (never its
 * position in the file or in a shard), so that a region gets the same draws whether it is
 * fitted alone, with every other region, or in any shard of a job array.
 */
import { createHash } from 'node:crypto';
import { deriveSeed } from '../util/rng.js';

/** Stream tag of region seeds, apart from the other streams derived from a run seed. */
const REGION_STREAM = 0x7e610;

/**
 * deriveSeed(runSeed, stream, w0, w1), where w0 and w1 are the first two 32-bit words of the
 * SHA-256 of the name's UTF-8 bytes.
 */
export function regionSeed(runSeed: number, name: string): number {
  const h = createHash('sha256').update(name, 'utf8').digest();
  return deriveSeed(runSeed, REGION_STREAM, h.readUInt32BE(0), h.readUInt32BE(4));
}
