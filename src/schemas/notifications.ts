import { z } from 'zod';
import { isValidTimeZone } from '@/src/lib/digest-schedule';

/**
 * Notification settings, as forms send them (checkboxes arrive as "on" or not at all; numbers
 * as strings). Shared by the settings page's server actions and the services behind them.
 */

const checkbox = z.preprocess((v) => v === true || v === 'on' || v === 'true', z.boolean());

export const digestTimingSchema = z.object({
  digestDay: z.coerce.number().int().min(0, 'Pick a day of the week').max(6, 'Pick a day of the week'),
  digestHour: z.coerce.number().int().min(0, 'Pick an hour from 0 to 23').max(23, 'Pick an hour from 0 to 23'),
  timeZone: z
    .string()
    .trim()
    .min(1, 'Pick a time zone')
    .refine(isValidTimeZone, 'Unknown time zone; use a name like Europe/Oslo or America/Halifax'),
});

/** A member's own subscription to one project. Both switches off = off. */
export const mySubscriptionSchema = digestTimingSchema.extend({
  projectId: z.uuid('Unknown project'),
  weeklyDigest: checkbox,
  failureAlerts: checkbox,
});
export type MySubscriptionInput = z.infer<typeof mySubscriptionSchema>;

/** A mailing-list address subscribed to a project by a maintainer. */
export const mailingListSchema = digestTimingSchema.extend({
  projectId: z.uuid('Unknown project'),
  email: z.string().trim().toLowerCase().pipe(z.email('Enter an e-mail address like team-list@example.com')),
  weeklyDigest: checkbox,
  failureAlerts: checkbox,
});
export type MailingListInput = z.infer<typeof mailingListSchema>;

export const removeMailingListSchema = z.object({ subscriptionId: z.uuid() });

export const digestPreviewSchema = z.object({
  projectId: z.uuid('Unknown project'),
  timeZone: z
    .string()
    .trim()
    .optional()
    .refine((tz) => tz === undefined || tz === '' || isValidTimeZone(tz), 'Unknown time zone'),
});
