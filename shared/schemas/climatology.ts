import { z } from 'zod'

export const ClimatologyUploadFields = z.object({
  name: z.string({ error: 'Name is required' }).trim().min(1, 'Name is required').max(160, 'The name is too long (at most 160 characters)'),
  source: z.string({ error: 'Source is required (where the data come from)' }).trim().min(1, 'Source is required (where the data come from)').max(500, 'The source is too long (at most 500 characters)'),
  licence: z.string().trim().max(200).optional(),
  years: z.string().trim().max(60).optional(),
  timeOfDay: z.string().trim().max(120).optional(),
  month: z.coerce.number({ error: 'Month must be 1–12' }).int('Month must be 1–12').min(1, 'Month must be 1–12').max(12, 'Month must be 1–12').optional(),
})
