import { randomUUID } from 'node:crypto'
import fs from 'node:fs/promises'
import path from 'node:path'

/**
 * Where uploaded files live. Callers see only keys; a local folder now, an S3-compatible store later
 * behind the same three methods.
 */
export interface FileStorage {
  put(data: Buffer, extension: string): Promise<string>
  get(key: string): Promise<Buffer>
  remove(key: string): Promise<void>
}

const KEY_PATTERN = /^[0-9a-f]{2}\/[0-9a-f-]{36}\.[a-z]{3,4}$/

export function createLocalStorage(root: string): FileStorage {
  const base = path.resolve(root)
  const fileFor = (key: string) => {
    // Keys are generated here; refusing anything else keeps a stored key from reaching outside the folder.
    if (!KEY_PATTERN.test(key)) throw new Error(`Not a storage key: ${key}`)
    return path.join(base, key)
  }
  return {
    async put(data, extension) {
      const id = randomUUID()
      const key = `${id.slice(0, 2)}/${id}.${extension}`
      const file = fileFor(key)
      await fs.mkdir(path.dirname(file), { recursive: true })
      await fs.writeFile(file, data, { flag: 'wx', mode: 0o640 })
      return key
    },
    get: (key) => fs.readFile(fileFor(key)),
    async remove(key) {
      await fs.rm(fileFor(key), { force: true })
    },
  }
}
