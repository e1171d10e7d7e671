import { spawn } from 'node:child_process'
import path from 'node:path'
import { describe, expect, it } from 'vitest'
import { bin, projectRoot } from '../../docker-free-dev/lib/children'

describe('SMS fake: the program', () => {
  it('listens on 127.0.0.1, prints its address, and stops cleanly on SIGTERM', async () => {
    const child = spawn(bin('tsx'), [path.join(projectRoot, 'docker-free-dev', 'sms-fake', 'main.ts')], {
      env: { ...process.env, SMS_FAKE_PORT: '0' },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)))
    const url = await new Promise<string>((resolve, reject) => {
      let out = ''
      child.stdout.on('data', (chunk: Buffer) => {
        out += chunk.toString()
        const found = /SMS fake listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(out)
        if (found?.[1]) resolve(found[1])
      })
      void exited.then((code) => reject(new Error(`exited with ${code} before listening: ${out}`)))
    })
    expect((await fetch(`${url}/api/messages`)).status).toBe(200)
    child.kill('SIGTERM')
    expect(await exited).toBe(0)
  })

  it('refuses a port that is not a number', async () => {
    const child = spawn(bin('tsx'), [path.join(projectRoot, 'docker-free-dev', 'sms-fake', 'main.ts')], {
      env: { ...process.env, SMS_FAKE_PORT: 'twelve' },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    let err = ''
    child.stderr.on('data', (chunk: Buffer) => (err += chunk.toString()))
    const code = await new Promise<number | null>((resolve) => child.once('exit', resolve))
    expect(code).toBe(1)
    expect(err).toMatch(/SMS_FAKE_PORT must be a whole number/)
  })
})
