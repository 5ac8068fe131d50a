import { z } from 'zod'

export const ClimatologyUploadFields = z.object({
  name: z.string({ error: 'name is required' }).trim().min(1, 'name is required').max(160),
  source: z.string({ error: 'source is required' }).trim().min(1, 'source is required (where the data come from)').max(500),
  licence: z.string().trim().max(200).optional(),
  years: z.string().trim().max(60).optional(),
  timeOfDay: z.string().trim().max(120).optional(),
  month: z.coerce.number({ error: 'month must be 1–12' }).int('month must be 1–12').min(1, 'month must be 1–12').max(12, 'month must be 1–12').optional(),
})
