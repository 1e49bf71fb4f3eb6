/**
 * Photograph benchmark: `npx tsx scripts/bench/photo.ts` (part of `npm run bench`).
 *
 * Checks and re-encodes jet photographs the way a hand-in does (server/images/photo.ts) and prints,
 * for each size, the median time, the growth of the process's resident memory, and the longest the
 * event loop was held up while it ran: the decoding is meant to run on libuv's thread pool, so other
 * requests keep being answered while a large photograph is read. A picture over the pixel limit is
 * refused from its header without being decoded. The pictures are rendered from our own model of a
 * jet (scripts/demo/jet-photo.ts), enlarged to camera sizes.
 */
import { monitorEventLoopDelay, performance } from 'node:perf_hooks'
import sharp from 'sharp'
import { preparePhoto } from '../../server/images/photo'
import { renderJetPhoto } from '../demo/jet-photo'

const ROUNDS = 5

const base = renderJetPhoto({
  exitDiameter: 0.008,
  jetDiameter: 0.0095,
  cellSpacing: 0.012,
  cells: 5,
  machDisk: 0.006,
  width: 1200,
  height: 600,
  pixelsPerMetre: 15_000,
  seed: 3,
})
const grey = sharp(Buffer.from(base.pixels), { raw: { width: base.width, height: base.height, channels: 1 } })

async function camera(width: number, height: number): Promise<Buffer> {
  return grey
    .clone()
    .resize(width, height, { fit: 'fill' })
    .toColourspace('srgb')
    .jpeg({ quality: 92 })
    .withExif({ IFD0: { Make: 'Bench camera', Model: 'Serial 0042' } })
    .toBuffer()
}

async function measure(name: string, bytes: Buffer, expectRefusal = false) {
  const times: number[] = []
  let rssGrowth = 0
  let loopMax = 0
  for (let round = 0; round < ROUNDS + 1; round++) {
    const rss0 = process.memoryUsage().rss
    let peak = rss0
    const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 5)
    const loop = monitorEventLoopDelay({ resolution: 5 })
    loop.enable()
    const t0 = performance.now()
    let refused = false
    try {
      await preparePhoto(bytes, 'photo:jet', 'Bench photograph')
    } catch {
      refused = true
    }
    const dt = performance.now() - t0
    loop.disable()
    clearInterval(sampler)
    if (refused !== expectRefusal) throw new Error(`${name}: ${refused ? 'refused' : 'accepted'} unexpectedly`)
    if (round === 0) continue // warm-up
    times.push(dt)
    rssGrowth = Math.max(rssGrowth, peak - rss0)
    loopMax = Math.max(loopMax, loop.max / 1e6)
  }
  times.sort((a, b) => a - b)
  const median = times[Math.floor(times.length / 2)]!
  console.log(
    `${name.padEnd(44)} ${(bytes.length / 1048576).toFixed(1).padStart(5)} MB  median ${median.toFixed(0).padStart(5)} ms  rss +${(rssGrowth / 1048576).toFixed(0).padStart(4)} MB  event loop held up ≤ ${loopMax.toFixed(0)} ms`,
  )
}

console.log(`photographs (server/images/photo.ts), ${ROUNDS} rounds after one warm-up; sharp ${sharp.versions.sharp}`)
// What the event loop shows doing nothing for 400 ms on this machine (timer resolution, other load).
{
  const idle = monitorEventLoopDelay({ resolution: 5 })
  idle.enable()
  await new Promise((resolve) => setTimeout(resolve, 400))
  idle.disable()
  console.log(`${'idle for 400 ms (for comparison)'.padEnd(44)} event loop held up ≤ ${(idle.max / 1e6).toFixed(0)} ms`)
}
await measure('12 MP JPEG (4000 × 3000) with EXIF', await camera(4000, 3000))
await measure('36 MP JPEG (7200 × 5000) with EXIF', await camera(7200, 5000))
await measure(
  'PNG of 10000 × 5000 black pixels (refused)',
  await sharp({ create: { width: 10_000, height: 5_000, channels: 3, background: '#000' } })
    .png({ compressionLevel: 9 })
    .toBuffer(),
  true,
)
