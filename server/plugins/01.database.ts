/** Starts migrations (and the demo seed) at boot; requests wait for them in server/middleware/00.ready.ts. */
export default defineNitroPlugin(() => {
  void dbReady()
})
