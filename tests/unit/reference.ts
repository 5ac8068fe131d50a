import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { parseCanonCsv } from '../../server/eclipse/canonCsv'
import type { BesselianElements } from '../../shared/eclipse/types'

/** Published reference data copied into the repository (see its README for the sources). */
export const REFERENCE_DIR = resolve(__dirname, '../fixtures/reference')

let sets: BesselianElements[] | undefined
/** Besselian elements from the Five Millennium Canon (Espenak & Meeus, NASA/TP-2006-214141), 1900–2100. */
export function canonSets(): BesselianElements[] {
  sets ??= parseCanonCsv(readFileSync(resolve(REFERENCE_DIR, 'canon-besselian-1900-2100.csv'), 'utf8'))
  return sets
}
export function canonSet(date: string): BesselianElements {
  const s = canonSets().find((e) => e.date === date)
  if (!s) throw new Error(`no Canon set for ${date}`)
  return s
}

export interface GreatestRow {
  date: string; type: string; greatestTd: string; deltaTSec: number; greatestUt: string; latDeg: number; lonDeg: number
  sunAltDeg: number; pathWidthKm: number; centralDurationSec: number; gamma: number; magnitude: number
}
/** Greatest-eclipse circumstances from the Five Millennium Canon, 2017–2031. */
export function canonGreatest(): GreatestRow[] {
  const text = readFileSync(resolve(REFERENCE_DIR, 'canon-greatest-eclipse.csv'), 'utf8')
  return text.split(/\r?\n/).filter((l) => /^\d{4}-/.test(l)).map((l) => {
    const c = l.split(',')
    const [m, s] = c[9]!.match(/(\d+)m(\d+)s/)!.slice(1).map(Number) as [number, number]
    return {
      date: c[0]!, type: c[1]!, greatestTd: c[2]!, deltaTSec: Number(c[3]), greatestUt: c[4]!, latDeg: Number(c[5]),
      lonDeg: Number(c[6]), sunAltDeg: Number(c[7]), pathWidthKm: Number(c[8]), centralDurationSec: m * 60 + s,
      gamma: Number(c[10]), magnitude: Number(c[11]),
    }
  })
}

export type ContactKey = 'c1' | 'c2' | 'max' | 'c3' | 'c4'
export interface UsnoLocalRow {
  eclipse: string; site: string; latDeg: number; lonDeg: number; heightM: number; deltaTSec: number
  /** UT1 as printed (hh:mm:ss.s); absent where USNO gives none; 'sunrise' / 'sunset' where USNO gives the horizon instead. */
  times: Partial<Record<ContactKey, string>>
  source: 'usno-api' | 'usno-2013'
}
/** Local circumstances at named sites from the U.S. Naval Observatory's Solar Eclipse Computer (see the file's header). */
export function usnoLocal(): UsnoLocalRow[] {
  const text = readFileSync(resolve(REFERENCE_DIR, 'usno-local-circumstances.csv'), 'utf8')
  const keys: ContactKey[] = ['c1', 'c2', 'max', 'c3', 'c4']
  return text.split(/\r?\n/).filter((l) => /^\d{4}-/.test(l)).map((l) => {
    const c = l.split(',')
    const times: UsnoLocalRow['times'] = {}
    keys.forEach((k, i) => { if (c[6 + i]) times[k] = c[6 + i] })
    return {
      eclipse: c[0]!, site: c[1]!, latDeg: Number(c[2]), lonDeg: Number(c[3]), heightM: Number(c[4]),
      deltaTSec: Number(c[5]), times, source: c[11] as UsnoLocalRow['source'],
    }
  })
}
