import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import type { TestProject } from 'vitest/node'
import { projectRoot } from '../../../docker-free-dev/lib/children'
import { ensureChromium } from './chromium'
import { resultsDir } from './context'
import { buildClient, startE2eStack } from './stack'

/**
 * Browser journeys: Debian's Chromium, a fresh client build and a stack of their own (see stack.ts).
 * TICKOVER_E2E_DIST=<folder> uses an existing client build instead of building one, to iterate faster.
 */
export default async function setup(project: TestProject) {
  const started = Date.now()
  ensureChromium()

  // Screenshots and logs of this run only: an old screen must not pass for a new one.
  fs.rmSync(path.join(resultsDir, 'screens'), { recursive: true, force: true })
  fs.rmSync(path.join(resultsDir, 'axe'), { recursive: true, force: true })

  let builtDir: string | undefined
  let clientDist = process.env.TICKOVER_E2E_DIST ? path.resolve(process.env.TICKOVER_E2E_DIST) : ''
  if (clientDist) {
    if (!fs.existsSync(path.join(clientDist, 'index.html'))) throw new Error(`TICKOVER_E2E_DIST=${clientDist} has no index.html`)
  } else {
    const t = Date.now()
    builtDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tickover-e2e-dist-'))
    clientDist = builtDir
    try {
      buildClient(clientDist)
    } catch (err) {
      fs.rmSync(builtDir, { recursive: true, force: true })
      throw err
    }
    process.stdout.write(`[e2e] client built in ${((Date.now() - t) / 1000).toFixed(1)} s\n`)
  }

  let stack
  try {
    stack = await startE2eStack({ clientDist, logDir: resultsDir })
  } catch (err) {
    if (builtDir) fs.rmSync(builtDir, { recursive: true, force: true })
    throw err
  }
  project.provide('e2e', stack.context)
  process.stdout.write(
    `[e2e] ready in ${((Date.now() - started) / 1000).toFixed(1)} s; app output in ${path.relative(projectRoot, stack.appLog)}\n`,
  )

  return async () => {
    await stack.stop()
    if (builtDir) fs.rmSync(builtDir, { recursive: true, force: true })
  }
}
