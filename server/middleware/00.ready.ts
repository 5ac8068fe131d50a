export default defineEventHandler(async () => {
  await dbReady()
})
