import { z } from 'zod';

const optionalText = z
  .string()
  .trim()
  .max(200)
  .optional()
  .transform((v) => (v ? v : undefined));

const optionalDate = z
  .string()
  .optional()
  .transform((v, ctx) => {
    if (!v) return undefined;
    const d = new Date(`${v}T00:00:00Z`);
    if (Number.isNaN(d.getTime())) {
      ctx.addIssue({ code: 'custom', message: 'use a date like 2026-11-30' });
      return z.NEVER;
    }
    return d;
  });

/** The overview's filters, as they come from the URL's query string. */
export const overviewQuerySchema = z.object({
  project: optionalText,
  branch: optionalText,
  verdict: z.enum(['problems', 'fail', 'warn', 'error', 'pass', 'all']).catch('problems'),
  from: optionalDate.catch(undefined),
  to: optionalDate.catch(undefined),
  sort: z.enum(['newest', 'oldest']).catch('newest'),
  page: z.coerce.number().int().min(1).max(10_000).catch(1),
});
export type OverviewQuery = z.infer<typeof overviewQuerySchema>;
