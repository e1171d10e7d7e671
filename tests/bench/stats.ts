/** Times fn `runs` times after `warmup` untimed runs; returns milliseconds. */
export async function measure(fn: () => unknown, runs: number, warmup = Math.min(20, runs)) {
  for (let i = 0; i < warmup; i++) await fn()
  const times: number[] = []
  for (let i = 0; i < runs; i++) {
    const start = process.hrtime.bigint()
    await fn()
    times.push(Number(process.hrtime.bigint() - start) / 1e6)
  }
  times.sort((a, b) => a - b)
  const at = (q: number) => times[Math.min(times.length - 1, Math.floor(q * times.length))] ?? NaN
  return { runs, median: at(0.5), p95: at(0.95), min: times[0] ?? NaN, max: times[times.length - 1] ?? NaN }
}

export function formatMs(ms: number): string {
  return `${ms.toFixed(3)} ms`
}
