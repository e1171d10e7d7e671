/**
 * What a customer's phone downloads before each portal page first paints: the app's entry (its JS
 * and CSS, with everything it imports statically) plus the lazy chunk(s) the route loads and their
 * static imports and CSS, each file gzipped on its own as a server would send it.
 * Target: under 250 kB (1 kB = 1000 bytes) for every portal route.
 *
 * Builds the client afresh into a temporary folder each run, with the project's own vite.config.ts,
 * so the figures always match the source (a stale dist/ could pass while the source fails) and no
 * one else's dist/ is touched. Fonts and images are not counted: the target is JS + CSS.
 */
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { gzipSync } from 'node:zlib'
import { build, type Manifest } from 'vite'

const TARGET_BYTES = 250_000
/** zlib's default level (6), the one most servers' gzip uses; level 9 would come out a little smaller. */
const GZIP_LEVEL = 6

const root = path.resolve(import.meta.dirname, '../..')

/**
 * The modules each route needs before it can paint, by source file. The layout wraps every portal
 * page. The e-mail link lands on the open page, which replaces itself with the estimate page as soon
 * as the link is accepted, so the customer waits for both before seeing their estimate.
 */
const layout = 'src/layouts/PortalLayout.vue'
const portalRoutes: { name: string; path: string; sources: string[] }[] = [
  { name: 'sign-in', path: '/portal/sign-in', sources: [layout, 'src/pages/portal/PortalSignInPage.vue'] },
  {
    name: 'open',
    path: '/portal/open → estimate',
    sources: [layout, 'src/pages/portal/PortalOpenPage.vue', 'src/pages/portal/PortalEstimatePage.vue'],
  },
  { name: 'estimate', path: '/portal/estimates/:id', sources: [layout, 'src/pages/portal/PortalEstimatePage.vue'] },
  { name: 'confirm', path: '/portal/estimates/:id/confirm', sources: [layout, 'src/pages/portal/PortalConfirmPage.vue'] },
  { name: 'paid', path: '/portal/estimates/:id/paid', sources: [layout, 'src/pages/portal/PortalPaidPage.vue'] },
  { name: 'account', path: '/portal/account', sources: [layout, 'src/pages/portal/PortalAccountPage.vue'] },
]

interface Built {
  outDir: string
  manifest: Manifest
  /** Output file → the source modules bundled into it (root-relative, forward slashes). */
  modulesByFile: Map<string, string[]>
}

async function buildClient(): Promise<Built> {
  const outDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tickover-portal-size-'))
  const result = await build({ root, logLevel: 'silent', build: { outDir, emptyOutDir: true, manifest: true } })
  const outputs = (Array.isArray(result) ? result : [result]).flatMap((r) => ('output' in r ? r.output : []))
  const modulesByFile = new Map<string, string[]>()
  for (const item of outputs) {
    if (item.type !== 'chunk') continue
    modulesByFile.set(
      item.fileName,
      item.moduleIds.map((id) => path.relative(root, id.split('?')[0]!).split(path.sep).join('/')),
    )
  }
  const manifest = JSON.parse(fs.readFileSync(path.join(outDir, '.vite/manifest.json'), 'utf8')) as Manifest
  return { outDir, manifest, modulesByFile }
}

/** The manifest key of the chunk holding `source`: its own entry if it has one, else the chunk it was bundled into. */
function chunkKeyFor(built: Built, source: string): string {
  if (built.manifest[source]) return source
  for (const [key, chunk] of Object.entries(built.manifest)) {
    if (built.modulesByFile.get(chunk.file)?.includes(source)) return key
  }
  throw new Error(`${source} is in no chunk of the build`)
}

/** Every JS and CSS file that loading `key` fetches: the chunk, its static imports (transitively) and their CSS. */
function staticClosure(manifest: Manifest, key: string, into: Set<string>): Set<string> {
  const chunk = manifest[key]
  if (!chunk) throw new Error(`no manifest entry ${key}`)
  if (into.has(chunk.file)) return into
  into.add(chunk.file)
  for (const css of chunk.css ?? []) into.add(css)
  for (const imported of chunk.imports ?? []) staticClosure(manifest, imported, into)
  return into
}

function gzipBytes(outDir: string, files: Iterable<string>, cache: Map<string, number>): number {
  let total = 0
  for (const file of files) {
    let size = cache.get(file)
    if (size === undefined) {
      size = gzipSync(fs.readFileSync(path.join(outDir, file)), { level: GZIP_LEVEL }).length
      cache.set(file, size)
    }
    total += size
  }
  return total
}

const kB = (bytes: number) => `${(bytes / 1000).toFixed(1)} kB`
const KiB = (bytes: number) => `${(bytes / 1024).toFixed(1)} KiB`

export default async function () {
  const started = Date.now()
  const built = await buildClient()
  try {
    const { manifest, outDir } = built
    const entryKey = Object.keys(manifest).find((k) => manifest[k]!.isEntry)
    if (!entryKey) throw new Error('the manifest has no entry')
    const entryFiles = staticClosure(manifest, entryKey, new Set())
    const cache = new Map<string, number>()
    const entryBytes = gzipBytes(outDir, entryFiles, cache)

    console.log(
      `client built in ${((Date.now() - started) / 1000).toFixed(1)} s; gzip level ${GZIP_LEVEL}, each file on its own; 1 kB = 1000 B`,
    )
    console.log(`entry (${entryKey}, ${entryFiles.size} files): ${kB(entryBytes)} (${KiB(entryBytes)})`)

    let worst = { name: '', bytes: 0 }
    for (const route of portalRoutes) {
      const files = new Set(entryFiles)
      const chunkKeys = [...new Set(route.sources.map((s) => chunkKeyFor(built, s)))]
      for (const key of chunkKeys) staticClosure(manifest, key, files)
      const bytes = gzipBytes(outDir, files, cache)
      if (bytes > worst.bytes) worst = { name: route.name, bytes }
      const lazy = chunkKeys.map((k) => path.basename(k)).join(' + ')
      console.log(
        `${route.name.padEnd(9)} ${route.path.padEnd(30)} ${kB(bytes).padStart(9)} (${KiB(bytes).padStart(10)})  ${String(files.size).padStart(2)} files; lazy: ${lazy}`,
      )
    }
    const verdict = worst.bytes < TARGET_BYTES ? 'within target' : 'OVER TARGET'
    console.log(
      `max: ${kB(worst.bytes)} (${KiB(worst.bytes)}) on ${worst.name}; target < ${kB(TARGET_BYTES)}: ${verdict}, margin ${kB(TARGET_BYTES - worst.bytes)}`,
    )
  } finally {
    fs.rmSync(built.outDir, { recursive: true, force: true })
  }
}
