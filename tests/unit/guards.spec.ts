import { spawnSync } from 'node:child_process'
import { mkdtempSync, readFileSync, statSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { deflateSync } from 'node:zlib'
import { getDecoder } from 'geotiff'
import type { Transporter } from 'nodemailer'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { backupDatabase, migrateToLatest, openDatabase } from '../../server/database/connection'
import { backupPostgres } from '../../server/database/pgBackup'
import { advanceClock, nowMs } from '../../server/services/clock'
import { lzwDecodedLength } from '../../server/services/geotiff'
import { singleFlight, withLease } from '../../server/services/leases'
import { enqueueMail, processOutbox } from '../../server/services/outbox'

// The test clock moves only on a local app with UMBRAFIELD_TEST_CLOCK=1 (the default URL is local).
beforeAll(() => { process.env.UMBRAFIELD_TEST_CLOCK = '1' })
afterAll(() => { delete process.env.UMBRAFIELD_TEST_CLOCK })

describe('outbox claims', () => {
  it('stamps each message\'s sending_since as it is sent, not once for the batch', async () => {
    const db = openDatabase(':memory:')
    await migrateToLatest(db)
    for (const n of [1, 2, 3]) await enqueueMail(db, { kind: 'test', to: { email: `p${n}@x.test` }, subject: `m${n}`, html: '<p>x</p>', text: 'x' })
    const start = nowMs()
    const seen: Array<{ to: string; sendingSince: string | null; sentAtMs: number }> = []
    // A slow SMTP server: each message takes 50 s (moved on the clock, not slept).
    const transport = {
      sendMail: async (m: { to: string }) => {
        const row = await db.selectFrom('outbox').select(['sending_since', 'status']).where('to_email', '=', m.to).executeTakeFirstOrThrow()
        expect(row.status).toBe('sending')
        seen.push({ to: m.to, sendingSince: row.sending_since, sentAtMs: nowMs() })
        advanceClock(50_000)
        return {}
      },
    } as unknown as Transporter
    expect(await processOutbox(db, transport, 'desk@x.test')).toEqual({ sent: 3, failed: 0 })
    expect(seen.map((s) => s.to)).toEqual(['p1@x.test', 'p2@x.test', 'p3@x.test'])
    // Each stamp is the moment that message was claimed, just before it went out.
    // (Real time between claim and send is milliseconds; the clock moves 50 s per message.)
    for (const s of seen) expect(s.sentAtMs - Date.parse(s.sendingSince!)).toBeLessThan(5_000)
    expect(Date.parse(seen[2]!.sendingSince!) - start).toBeGreaterThanOrEqual(100_000)
    await db.destroy()
  })
})

describe('housekeeping runs', () => {
  it('never overlap: a tick during a run is skipped', async () => {
    let release!: () => void
    let runs = 0
    const tick = singleFlight(async () => { runs++; await new Promise<void>((r) => { release = r }) })
    const first = tick()
    expect(await tick()).toBe(false)
    expect(await tick()).toBe(false)
    release()
    expect(await first).toBe(true)
    expect(runs).toBe(1)
    const again = tick()
    release()
    expect(await again).toBe(true)
    expect(runs).toBe(2)
  })

  it('keep their lease while a run outlasts its TTL (a slow Stripe), and a second taker is refused', async () => {
    const db = openDatabase(':memory:')
    await migrateToLatest(db)
    const ttlMs = 150
    let expiresDuring = ''
    let nowDuring = 0
    let secondTookIt: boolean | undefined
    await withLease(db, 'housekeeping', ttlMs, async () => {
      // The run lasts three TTLs of real time (the heartbeat is a real timer).
      await new Promise((r) => setTimeout(r, ttlMs * 3))
      const row = await db.selectFrom('job_leases').select(['expires_at', 'holder']).where('name', '=', 'housekeeping').executeTakeFirstOrThrow()
      expiresDuring = row.expires_at
      nowDuring = nowMs()
      // Another instance (another holder name) would only take a lapsed lease.
      const other = await db.updateTable('job_leases').set({ holder: 'other-instance' }).where('name', '=', 'housekeeping')
        .where('expires_at', '<=', new Date(nowDuring).toISOString()).executeTakeFirst()
      secondTookIt = Number(other.numUpdatedRows) > 0
    })
    expect(Date.parse(expiresDuring)).toBeGreaterThan(nowDuring)
    expect(secondTookIt).toBe(false)
    await db.destroy()
  })
})

describe('backups', () => {
  it('are written 0600 in a 0700 folder', async () => {
    const db = openDatabase(':memory:')
    await migrateToLatest(db)
    const dir = join(mkdtempSync(join(tmpdir(), 'uf-backup-')), 'backups')
    const file = await backupDatabase(db, join(dir, 'umbrafield-test.sqlite'))
    expect(statSync(file).mode & 0o777).toBe(0o600)
    expect(statSync(dir).mode & 0o777).toBe(0o700)
    expect(statSync(file).size).toBeGreaterThan(0)
    await db.destroy()
  })

  it('of PostgreSQL are 0600 in a 0700 folder too, whatever the umask pg_dump runs with', () => {
    // A stand-in for pg_dump that writes its --file the way a program does, under umask 022.
    const bin = mkdtempSync(join(tmpdir(), 'uf-pgdump-'))
    const fake = join(bin, 'pg_dump')
    writeFileSync(fake, `#!/bin/sh\numask 022\nfor a in "$@"; do case "$a" in --file=*) printf 'PGDMP' > "\${a#--file=}";; esac; done\n`, { mode: 0o755 })
    const dir = join(mkdtempSync(join(tmpdir(), 'uf-backup-')), 'backups')
    const file = backupPostgres('postgres://nobody@127.0.0.1:1/none', join(dir, 'umbrafield-test.dump'), fake)
    expect(readFileSync(file, 'utf8')).toBe('PGDMP')
    expect(statSync(file).mode & 0o777).toBe(0o600)
    expect(statSync(dir).mode & 0o777).toBe(0o700)
  })

  it('never land in git: data/backups is ignored', () => {
    for (const f of ['data/backups/umbrafield-2027-08-02.sqlite', 'data/backups/umbrafield-2027-08-02.dump']) {
      expect(spawnSync('git', ['check-ignore', '-q', f], { cwd: join(__dirname, '../..') }).status, f).toBe(0)
    }
  })
})

/** TIFF-flavour LZW (MSB first, 9–12-bit codes, width raised one code early), for the length counter's test. */
function lzwEncode(data: Uint8Array): Uint8Array {
  const out: number[] = []
  let acc = 0, bits = 0
  let width = 9
  const put = (code: number) => {
    acc = (acc << width) | code; bits += width
    while (bits >= 8) { out.push((acc >> (bits - 8)) & 0xff); bits -= 8 }
    acc &= (1 << bits) - 1
  }
  let dict = new Map<string, number>()
  let next = 258
  const reset = () => { dict = new Map(); next = 258; width = 9 }
  put(256)
  reset()
  let w = String.fromCharCode(data[0]!)
  for (let i = 1; i < data.length; i++) {
    const c = String.fromCharCode(data[i]!)
    const wc = w + c
    if (wc.length > 1 && dict.has(wc)) { w = wc; continue }
    put(w.length === 1 ? w.charCodeAt(0) : dict.get(w)!)
    dict.set(wc, next++)
    if (next >= 2 ** width) {
      if (width === 12) { put(256); reset() } else width++
    }
    w = c
  }
  put(w.length === 1 ? w.charCodeAt(0) : dict.get(w)!)
  put(257)
  if (bits > 0) out.push((acc << (8 - bits)) & 0xff)
  return new Uint8Array(out)
}

describe('bounded raster decoding', () => {
  it.each([[1], [1000], [70_000]])('counts the LZW-decoded length of %i bytes exactly, as geotiff decodes them', async (n) => {
    let seed = 7
    const data = new Uint8Array(n).map(() => { seed = (seed * 1103515245 + 12345) % 2147483648; return (seed >> 16) % 5 })
    const encoded = lzwEncode(data)
    const lzw = await getDecoder(5, { tileWidth: 1, tileHeight: 1, predictor: 1, bitsPerSample: 8, planarConfiguration: 1 })
    const decoded = new Uint8Array(await lzw.decodeBlock(encoded.buffer as ArrayBuffer) as ArrayBuffer)
    expect(decoded).toEqual(data)
    expect(lzwDecodedLength(encoded, Number.MAX_SAFE_INTEGER)).toBe(n)
  })
  it('stops counting an LZW bomb as soon as it passes the limit', () => {
    const bomb = lzwEncode(new Uint8Array(400_000))
    expect(bomb.length).toBeLessThan(20_000)
    expect(lzwDecodedLength(bomb, 4096)).toBeGreaterThan(4096)
    expect(lzwDecodedLength(bomb, 4096)).toBeLessThan(4096 + 4097)
  })
  it('a deflate bomb is small', () => {
    // The ratio the server test relies on: deflate packs zeros about 1000 to 1.
    expect(deflateSync(Buffer.alloc(16 << 20), { level: 9 }).length).toBeLessThan(20_000)
  })
})
