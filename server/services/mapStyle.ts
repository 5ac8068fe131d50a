import { TILE_MAX_ZOOM } from './tiles'

/**
 * The basemap style: a pale paper land on a slate-violet sea, hairline borders, and place labels
 * sized by population. Text is drawn by the browser in Work Sans (no glyphs URL), which MapLibre
 * supports since 5.11 when a style omits `glyphs`.
 */
export function mapStyle(origin: string) {
  return {
    version: 8,
    name: 'Umbrafield paper',
    sources: {
      base: {
        type: 'vector',
        tiles: [`${origin}/tiles/{z}/{x}/{y}.pbf`],
        minzoom: 0,
        maxzoom: TILE_MAX_ZOOM,
        attribution: 'Natural Earth · GeoNames',
      },
    },
    layers: [
      { id: 'sea', type: 'background', paint: { 'background-color': '#cfd3e6' } },
      { id: 'land', type: 'fill', source: 'base', 'source-layer': 'land', paint: { 'fill-color': '#f7f3ea' } },
      {
        id: 'coast', type: 'line', source: 'base', 'source-layer': 'coast',
        paint: { 'line-color': '#9c97bf', 'line-width': ['interpolate', ['linear'], ['zoom'], 1, 0.4, 8, 1.2] },
      },
      {
        id: 'borders', type: 'line', source: 'base', 'source-layer': 'borders',
        paint: { 'line-color': '#8479b8', 'line-width': ['interpolate', ['linear'], ['zoom'], 1, 0.4, 8, 1.4], 'line-dasharray': [3, 2] },
      },
      {
        id: 'places', type: 'symbol', source: 'base', 'source-layer': 'places',
        filter: ['<=', ['get', 'minzoom'], ['zoom']],
        layout: {
          'text-field': ['get', 'name'],
          'text-font': ['Work Sans'],
          'text-size': ['interpolate', ['linear'], ['get', 'population'], 15000, 11, 1000000, 13, 10000000, 15],
          'text-anchor': 'top',
          'text-offset': [0, 0.4],
          'text-max-width': 8,
          'symbol-sort-key': ['-', 0, ['get', 'population']],
        },
        paint: { 'text-color': '#27224a', 'text-halo-color': '#fbf9f4', 'text-halo-width': 1.4 },
      },
      {
        id: 'place-dots', type: 'circle', source: 'base', 'source-layer': 'places',
        filter: ['<=', ['get', 'minzoom'], ['zoom']],
        paint: { 'circle-radius': 2, 'circle-color': '#383063' },
      },
    ],
  }
}
