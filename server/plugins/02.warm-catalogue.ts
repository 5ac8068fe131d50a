import { catalogue } from '../eclipse/catalogue'

/** Computes the 1900–2100 catalogue (about 2 s) just after start-up rather than on the first visitor's request. */
export default defineNitroPlugin(() => {
  setTimeout(() => { catalogue() }, 200)
})
