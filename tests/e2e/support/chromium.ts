import { spawnSync } from 'node:child_process'
import fs from 'node:fs'

/** Debian's own build: the journeys never download a browser. */
export const CHROMIUM_PATH = '/usr/bin/chromium'

function run(command: string, args: string[]): void {
  const res = spawnSync(command, args, { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })
  if (res.status !== 0) throw new Error(`${[command, ...args].join(' ')} failed (exit ${res.status ?? res.signal})`)
}

function hasPasswordlessSudo(): boolean {
  return spawnSync('sudo', ['-n', 'true'], { stdio: 'ignore' }).status === 0
}

/** Installs Debian's chromium package when it is missing: as root directly, otherwise through sudo. */
export function ensureChromium(): void {
  if (fs.existsSync(CHROMIUM_PATH)) return
  const asRoot = process.getuid?.() === 0
  if (!asRoot && !hasPasswordlessSudo()) {
    throw new Error(
      `Chromium is not installed (${CHROMIUM_PATH} is missing) and this user can neither install packages nor use sudo without a password. ` +
        'Install it once as root with: apt-get install -y chromium',
    )
  }
  const [command, ...before] = asRoot ? ['apt-get'] : ['sudo', '-n', 'apt-get']
  process.stdout.write("Installing Chromium from Debian's packages…\n")
  run(command as string, [...before, 'update', '-qq'])
  run(command as string, [...before, 'install', '-y', '-qq', 'chromium'])
  if (!fs.existsSync(CHROMIUM_PATH)) throw new Error(`apt-get installed chromium but ${CHROMIUM_PATH} is still missing`)
}
