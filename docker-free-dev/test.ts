/**
 * `npm test`: a throwaway PostgreSQL (own data folder, free port, database `tickover_test`), the mail
 * catcher and the payments fake; then type-check, lint and every vitest test; then the browser journeys,
 * which build the client and start a stack of their own (tests/e2e/support/global.ts). Services stop
 * even on failure.
 */
import { spawn } from 'node:child_process'
import { bin, projectRoot } from './lib/children'
import { type TestServices, startTestServices } from './lib/test-services'

interface Step {
  name: string
  command: string
  args: string[]
  /** Starts its own services: it is not given the shared ones, so it can never touch their database. */
  ownServices?: boolean
}

const steps: Step[] = [
  // The package scripts, so the projects type-checked and the lint checks are defined once.
  { name: 'type-check', command: 'npm', args: ['run', '--silent', 'typecheck'] },
  { name: 'lint', command: 'npm', args: ['run', '--silent', 'lint'] },
  { name: 'unit and API tests', command: bin('vitest'), args: ['run', ...process.argv.slice(2)] },
  // Run even after a failure above: a broken journey is worth knowing about in the same run.
  { name: 'browser journeys', command: bin('vitest'), args: ['run', '-c', 'vitest.e2e.config.ts'], ownServices: true },
]

let services: TestServices | undefined

function run(step: Step, env: Record<string, string>): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn(step.command, step.args, { cwd: projectRoot, stdio: 'inherit', env: { ...process.env, ...env, NODE_ENV: 'test' } })
    child.once('exit', (code, signal) => resolve(code ?? (signal ? 1 : 0)))
  })
}

async function main(): Promise<number> {
  const started = Date.now()
  services = await startTestServices()
  const results: { name: string; code: number; seconds: number }[] = []
  for (const step of steps) {
    console.log(`\n=== ${step.name} ===`)
    const t = Date.now()
    const code = await run(step, step.ownServices ? {} : services.env)
    results.push({ name: step.name, code, seconds: (Date.now() - t) / 1000 })
  }
  console.log('\n=== summary ===')
  for (const r of results) console.log(`${r.code === 0 ? 'ok  ' : 'FAIL'}  ${r.name} (${r.seconds.toFixed(1)} s)`)
  console.log(`total ${((Date.now() - started) / 1000).toFixed(1)} s`)
  return results.some((r) => r.code !== 0) ? 1 : 0
}

async function stopAndExit(code: number) {
  await services?.stop()
  process.exit(code)
}

process.on('SIGINT', () => void stopAndExit(130))
process.on('SIGTERM', () => void stopAndExit(143))

main().then(stopAndExit, async (err: unknown) => {
  console.error(err)
  await stopAndExit(1)
})
