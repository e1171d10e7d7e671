/**
 * The `npm run estimate` command. Two cases run it as a separate process (`npx tsx`), to check
 * the wiring, stdout and exit code; the other failure kinds call the same entry point in-process,
 * because each process start costs about two seconds on this machine.
 */
import { spawn } from 'node:child_process'
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { runEstimateCli } from '../../server/cli/estimate'
import { calculateEstimate } from '../../shared/estimate'

const fixture = (name: string) => `tests/fixtures/${name}`

function runCommand(...args: string[]): Promise<{ code: number | null; output: unknown }> {
  return new Promise((resolve, reject) => {
    const child = spawn('npx', ['tsx', 'server/cli/estimate.ts', ...args], { stdio: ['ignore', 'pipe', 'pipe'] })
    let stdout = ''
    let stderr = ''
    child.stdout.on('data', (chunk: Buffer) => (stdout += chunk.toString()))
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()))
    child.on('error', reject)
    child.on('close', (code) => {
      try {
        resolve({ code, output: JSON.parse(stdout) })
      } catch {
        reject(new Error(`Not JSON on stdout (exit ${code}): ${stdout}\n${stderr}`))
      }
    })
  })
}

// Process starts are slow when the machine is busy; these two get room to finish.
const slow = { timeout: 60_000 }

describe.concurrent('estimate command', () => {
  it('prints the priced estimate and exits 0', slow, async () => {
    const { code, output } = await runCommand(fixture('estimate-shared-hub.json'))
    expect(code).toBe(0)
    // The same figures as the engine in this process, and the hand-worked swivel labour:
    // 2.6 h − 1.5 h of hub already off for the CV joint = 1.1 h × £85 = £93.50.
    expect(output).toEqual(calculateEstimate(JSON.parse(readFileSync(fixture('estimate-shared-hub.json'), 'utf8'))))
    const swivel = (output as { items: { id: string; lines: { amount: number; sharedHours: string }[] }[] }).items[1]!
    expect([swivel.id, swivel.lines[0]!.amount, swivel.lines[0]!.sharedHours]).toEqual(['swivel-fl', 9350, '1.5'])
  })

  it('prints the issues of an invalid estimate and exits 1', slow, async () => {
    const { code, output } = await runCommand(fixture('estimate-invalid.json'))
    expect(code).toBe(1)
    expect(output).toMatchObject({
      error: {
        code: 'invalid_estimate',
        message: expect.stringMatching(/swivel-fl.*cv-fl/),
        issues: [{ code: 'custom', path: ['items', 1, 'requires', 0], message: expect.stringMatching(/which is declined/) }],
      },
    })
  })
})

describe('estimate command failures', () => {
  it.each([
    { args: [fixture('estimate-bad-json.json')], errorCode: 'invalid_json' },
    { args: [fixture('estimate-does-not-exist.json')], errorCode: 'unreadable_file' },
    { args: [], errorCode: 'missing_file' },
  ])('exits 1 with $errorCode', async ({ args, errorCode }) => {
    const { exitCode, output } = await runEstimateCli(args)
    expect(exitCode).toBe(1)
    expect(output).toMatchObject({ error: { code: errorCode, message: expect.any(String), issues: [] } })
  })

  it('succeeds in-process with the same result as the engine', async () => {
    const { exitCode, output } = await runEstimateCli([fixture('estimate-shared-hub.json')])
    expect(exitCode).toBe(0)
    expect(output).toEqual(calculateEstimate(JSON.parse(readFileSync(fixture('estimate-shared-hub.json'), 'utf8'))))
  })
})
