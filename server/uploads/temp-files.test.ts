import { spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, mkdtempSync, rmSync, utimesSync, writeFileSync } from 'node:fs'
import { hostname, tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { sweepTempUploads, tempUploads } from './temp-files'

const root = mkdtempSync(join(tmpdir(), 'nestwise-uploads-'))
afterAll(() => rmSync(root, { recursive: true, force: true }))

const TWO_DAYS_AGO = (Date.now() - 2 * 24 * 60 * 60 * 1000) / 1000

function folder(name: string, old = false): string {
  const dir = join(root, name)
  mkdirSync(dir, { recursive: true })
  writeFileSync(join(dir, 'part.csv'), 'a,b\n')
  if (old) utimesSync(dir, TWO_DAYS_AGO, TWO_DAYS_AGO)
  return dir
}

describe('temp uploads', () => {
  it('gives each process a folder of its own and random names that keep the extension', () => {
    const temp = tempUploads(root, 'lab-host-123')
    const a = temp.pathFor('Cells March.CSV')
    expect(dirname(a)).toBe(join(root, 'lab-host-123'))
    expect(a).toMatch(/\/\d+-[0-9a-f]{16}\.csv$/)
    expect(temp.pathFor('Cells March.CSV')).not.toBe(a)
  })

  it('sweeps folders of processes gone on this host at once, others only after a day, and never its own', async () => {
    const gone = spawnSync(process.execPath, ['-e', '']).pid!
    const crashed = folder(`${hostname()}-${gone}`)
    const alive = folder(`${hostname()}-${process.ppid}`)
    const own = folder(`${hostname()}-${process.pid}`, true)
    const elsewhere = folder('other-host-42')
    const elsewhereOld = folder('other-host-43', true)
    const loose = join(root, 'old-layout.csv')
    writeFileSync(loose, 'x')
    utimesSync(loose, TWO_DAYS_AGO, TWO_DAYS_AGO)
    expect(await sweepTempUploads(root)).toEqual({ folders: 2, files: 1 })
    expect([crashed, alive, own, elsewhere, elsewhereOld, loose].map((p) => existsSync(p))).toEqual([
      false,
      true,
      true,
      true,
      false,
      false,
    ])
  })
})
