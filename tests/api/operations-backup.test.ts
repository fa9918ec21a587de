import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { existsSync } from 'node:fs'
import { mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises'
import path from 'node:path'
import { QueryTypes } from 'sequelize'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { makeStaff } from '../helpers/factories'
import { makePatient } from '../helpers/pathwayFactories'
import { restoreBackup, sha256File, tableChecksums, takeBackup, verifyBackup } from '../../scripts/lib/backup'

// Issue #18 point 4: npm run backup / npm run restore on the test database, with real
// mariadb-dump and mariadb, and a real upload directory.

let t: TestApp
let work: string
let uploadDir: string
beforeAll(async () => {
  const dataDir = process.env.MARIADB_DATA_DIR ?? process.cwd()
  work = await mkdtemp(path.join(path.dirname(dataDir), '.backup-test-'))
  uploadDir = path.join(work, 'uploads')
  t = makeTestApp({ UPLOAD_DIR: uploadDir })
  await cleanDatabase(t.sequelize)
})
afterAll(async () => {
  await t.close()
  await rm(work, { recursive: true, force: true })
})

const q = (sql: string) => t.sequelize.query(sql, { type: QueryTypes.RAW })

describe('a backup and its restore', () => {
  let backup = ''

  it('when data changes after a backup, then restoring it brings back every table and file exactly', async () => {
    await makeStaff('nurse')
    await makePatient({ familyName: 'Backupton' })
    await t.sequelize.query(
      `INSERT INTO audit_entries (at, user_id, action, entity, entity_id, ip, request_id) VALUES (UTC_TIMESTAMP(), NULL, ` +
        `'login', 'user', '1', '127.0.0.1', 'backup-test')`,
      { type: QueryTypes.INSERT },
    )
    await mkdir(path.join(uploadDir, 'episode-1'), { recursive: true })
    await writeFile(path.join(uploadDir, 'episode-1', 'letter.pdf'), '%PDF-1.7 invented test document\n')
    const before = await tableChecksums(t.sequelize)
    expect(before.patients!.rows).toBe(1)

    backup = await takeBackup(t.config, path.join(work, 'backups'))
    const manifest = await verifyBackup(backup)
    expect(manifest.files.map((f) => f.path)).toEqual(['database.sql', 'uploads/episode-1/letter.pdf'])
    expect(manifest.tables).toEqual(before)
    expect(await readFile(path.join(backup, 'database.sql'), 'utf8')).toMatch(/CREATE\b.*TRIGGER `?audit_entries_no_delete/)

    // Afterwards: a new patient, a changed one, a new file, a lost file.
    await makePatient({ familyName: 'Afterwards' })
    await q(`UPDATE patients SET given_name = 'Changed' WHERE family_name = 'Backupton'`)
    await writeFile(path.join(uploadDir, 'stray.txt'), 'written after the backup')
    await rm(path.join(uploadDir, 'episode-1', 'letter.pdf'))
    expect(JSON.stringify(await tableChecksums(t.sequelize))).not.toBe(JSON.stringify(before))

    const r = await restoreBackup(t.config, backup)
    expect(r.differing).toEqual([])
    expect(await tableChecksums(t.sequelize)).toEqual(before)
    expect(await readFile(path.join(uploadDir, 'episode-1', 'letter.pdf'), 'utf8')).toBe('%PDF-1.7 invented test document\n')
    expect(existsSync(path.join(uploadDir, 'stray.txt'))).toBe(false)
    expect(existsSync(path.join(r.previousUploads!, 'stray.txt'))).toBe(true)
    // The audit trail is append-only again after the restore.
    await expect(q('DELETE FROM audit_entries')).rejects.toThrow()
  })

  it('when a file of the backup is damaged, then the restore is refused and the database is left as it is', async () => {
    const sql = path.join(backup, 'database.sql')
    const original = await readFile(sql, 'utf8')
    await writeFile(sql, original.replace('Backupton', 'Backupten'))
    const before = await tableChecksums(t.sequelize)
    await expect(restoreBackup(t.config, backup)).rejects.toThrow(/database\.sql does not match its checksum: the backup is damaged/)
    expect(await tableChecksums(t.sequelize)).toEqual(before)
    await writeFile(sql, original)
  })

  it('when the backup was taken by a newer Ferrolane, then the restore is refused and says so', async () => {
    const manifestFile = path.join(backup, 'manifest.json')
    const m = JSON.parse(await readFile(manifestFile, 'utf8'))
    m.migrations.push('0999-from-the-future')
    await writeFile(manifestFile, JSON.stringify(m))
    // Without a matching checksum line it is refused as damaged...
    await expect(verifyBackup(backup)).rejects.toThrow(/manifest\.json does not match its checksum/)
    // ...and with one, as a backup this version cannot read.
    const sums = (await readFile(path.join(backup, 'SHA256SUMS'), 'utf8')).replace(
      /^\w{64} {2}manifest\.json$/m,
      `${await sha256File(manifestFile)}  manifest.json`,
    )
    await writeFile(path.join(backup, 'SHA256SUMS'), sums)
    await expect(restoreBackup(t.config, backup)).rejects.toThrow(/taken by a newer Ferrolane \(migrations 0999-from-the-future/)
  })
})
