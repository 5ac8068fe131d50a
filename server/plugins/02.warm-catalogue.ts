import { catalogue } from '../eclipse/catalogue'
import { tile } from '../services/tiles'

/** Computes the 1900–2100 catalogue and the basemap tile index just after start-up, not on a visitor's first request. */
export default defineNitroPlugin(() => {
  setTimeout(() => {
    catalogue()
    tile(0, 0, 0)
  }, 200)
})
