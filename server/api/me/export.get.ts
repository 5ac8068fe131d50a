import { exportPersonalData } from '../../services/personalData/export'

/** Everything held about the caller, as one JSON file to download (account, bookings, participants, payments, e-mails). */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  const data = await exportPersonalData(useDb(), user)
  setResponseHeader(event, 'content-disposition', `attachment; filename="umbrafield-my-data-${data.exportedAt.slice(0, 10)}.json"`)
  setResponseHeader(event, 'cache-control', 'no-store')
  return data
})
