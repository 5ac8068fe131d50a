import { toSafeCsv } from './csv'
import type { FeatureCollection } from '../../shared/eclipse/path'
import type { SiteOut } from './planning'

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;')

function siteDescription(s: SiteOut): string {
  const m = s.metrics
  const parts = [`${m.type}`, m.durationSec ? `central phase ${m.durationSec.toFixed(1)} s` : `magnitude ${m.magnitude.toFixed(3)}`]
  if (m.centrelineDistanceKm !== null) parts.push(`${m.centrelineDistanceKm.toFixed(1)} km from centreline`)
  if (m.c2Local) parts.push(`C2 ${m.c2Local} (${m.zone})`)
  if (m.sunAltitudeDeg !== null) parts.push(`Sun ${m.sunAltitudeDeg.toFixed(1)}°`)
  return parts.join('; ')
}

/** RFC 7946 GeoJSON: the path's lines and ticks plus one Point per site. */
export function toGeoJson(name: string, path: FeatureCollection, sites: SiteOut[]) {
  return {
    type: 'FeatureCollection',
    name,
    features: [
      ...path.features,
      ...sites.map((s) => ({
        type: 'Feature',
        geometry: { type: 'Point', coordinates: s.elevationM === null ? [s.lon, s.lat] : [s.lon, s.lat, s.elevationM] },
        properties: { kind: 'site', id: s.id, name: s.name, notes: s.notes, ...s.metrics },
      })),
    ],
  }
}

/** KML 2.2: a folder of site placemarks and a folder of path lines. */
export function toKml(name: string, path: FeatureCollection, sites: SiteOut[]): string {
  const lines: string[] = []
  for (const f of path.features) {
    const p = f.properties as { kind: string; line?: string; fraction?: number }
    if (f.geometry && (f.geometry as { type: string }).type !== 'Point') {
      const g = f.geometry as { type: string; coordinates: number[][] | number[][][] }
      const parts = g.type === 'LineString' ? [g.coordinates as number[][]] : (g.coordinates as number[][][])
      const label = p.kind === 'duration' ? `${Math.round((p.fraction ?? 0) * 100)}% duration (${p.line})` : `${p.kind} ${p.line ?? ''}`.trim()
      for (const part of parts) {
        lines.push(`<Placemark><name>${esc(label)}</name><styleUrl>#${esc(p.kind)}</styleUrl><LineString><tessellate>1</tessellate><coordinates>${part.map((c) => `${c[0]},${c[1]},0`).join(' ')}</coordinates></LineString></Placemark>`)
      }
    }
  }
  const marks = sites.map((s) => `<Placemark><name>${esc(s.name)}</name><description>${esc(siteDescription(s))}</description><styleUrl>#site</styleUrl><Point><coordinates>${s.lon},${s.lat}${s.elevationM === null ? '' : `,${s.elevationM}`}</coordinates></Point></Placemark>`)
  return `<?xml version="1.0" encoding="UTF-8"?>
<kml xmlns="http://www.opengis.net/kml/2.2"><Document><name>${esc(name)}</name>
<Style id="centreline"><LineStyle><color>ff33aeee</color><width>3</width></LineStyle></Style>
<Style id="limit"><LineStyle><color>ff7f414b</color><width>2</width></LineStyle></Style>
<Style id="site"><IconStyle><scale>1.1</scale></IconStyle></Style>
<Folder><name>Sites</name>${marks.join('\n')}</Folder>
<Folder><name>Path</name>${lines.join('\n')}</Folder>
</Document></kml>
`
}

/** GPX 1.1 waypoints, one per site. */
export function toGpx(name: string, sites: SiteOut[]): string {
  const wpts = sites.map((s) => `  <wpt lat="${s.lat}" lon="${s.lon}">${s.elevationM === null ? '' : `<ele>${s.elevationM}</ele>`}<name>${esc(s.name)}</name><desc>${esc(siteDescription(s))}</desc></wpt>`)
  return `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="Umbrafield" xmlns="http://www.topografix.com/GPX/1/1">
  <metadata><name>${esc(name)}</name></metadata>
${wpts.join('\n')}
</gpx>
`
}

/** CSV of sites and their metrics (header row; numbers with a dot). */
export function toCsv(sites: SiteOut[]): string {
  return toSafeCsv(sites.map((s) => ({
    name: s.name, lat: s.lat, lon: s.lon, elevation_m: s.elevationM, type: s.metrics.type,
    centreline_distance_km: s.metrics.centrelineDistanceKm, half_width_fraction: s.metrics.halfWidthFraction,
    duration_sec: s.metrics.durationSec, magnitude: s.metrics.magnitude, c2_utc: s.metrics.c2Utc, c2_local: s.metrics.c2Local,
    zone: s.metrics.zone, sun_altitude_deg: s.metrics.sunAltitudeDeg, sun_azimuth_deg: s.metrics.sunAzimuthDeg,
    cloud_pct: s.metrics.cloudPct, p_clear: s.metrics.pClear, expected_sec: s.metrics.expectedSec, cloud_source: s.metrics.cloudSource,
    road_access: s.roadAccess, capacity: s.capacity, crosses_border: s.crossesBorder, notes: s.notes,
  }))) // a name like "=HYPERLINK(…)" stays text in a spreadsheet
}
