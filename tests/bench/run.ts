/**
 * Runs every tests/bench/*.bench.ts (or those named on the command line) in turn.
 * Each bench module's default export prints its own figures.
 */
import fs from 'node:fs'
import path from 'node:path'
import { pathToFileURL } from 'node:url'

const dir = import.meta.dirname
const wanted = process.argv.slice(2)
const files = fs
  .readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => wanted.length === 0 || wanted.some((w) => f.startsWith(w)))
  .sort()

for (const file of files) {
  console.log(`\n# ${file.replace('.bench.ts', '')}`)
  const mod = (await import(pathToFileURL(path.join(dir, file)).href)) as { default: () => Promise<void> }
  await mod.default()
}
process.exit(0)
