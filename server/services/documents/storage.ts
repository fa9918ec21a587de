import { randomUUID } from 'node:crypto'
import { mkdir, readFile, rm, writeFile } from 'node:fs/promises'
import path from 'node:path'
import type { Config } from '../../config'
import { NotFound } from '../../errors'

// Stored names are ours (random UUIDs); anything else coming back from the database is refused
// before it reaches the file system, so a corrupted row can never point outside the store.
const STORED_NAME = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/

function storedPath(config: Config, storedName: string): string {
  if (!STORED_NAME.test(storedName)) throw new Error(`Refusing a stored document name that is not ours: ${storedName}`)
  return path.join(config.uploadDir, storedName)
}

/**
 * Writes the bytes under a fresh random name, then runs `record` (the database rows). If
 * recording fails the file is removed again, so a refused or failed write leaves nothing behind.
 */
export async function storeThenRecord<T>(config: Config, bytes: Buffer, record: (storedName: string) => Promise<T>): Promise<T> {
  await mkdir(config.uploadDir, { recursive: true, mode: 0o700 })
  const storedName = randomUUID()
  const file = storedPath(config, storedName)
  await writeFile(file, bytes, { flag: 'wx', mode: 0o600 })
  try {
    return await record(storedName)
  } catch (err) {
    await rm(file, { force: true })
    throw err
  }
}

export async function readStored(config: Config, storedName: string): Promise<Buffer> {
  try {
    return await readFile(storedPath(config, storedName))
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') throw new NotFound('The stored file of this document')
    throw err
  }
}
