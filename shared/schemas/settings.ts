import { z } from 'zod';
import { flagThresholdsSchema } from './project-settings';

/** Installation-wide settings an admin edits (the reject reasons have their own endpoint). */
export const settingsSchema = z.strictObject({
  /** Flag thresholds that new projects start with (each project may change its own afterwards). */
  projectFlagDefaults: flagThresholdsSchema,
  mailFrom: z
    .string()
    .trim()
    .min(3)
    .max(200)
    .regex(/^[^<>]*<[^@\s<>]+@[^@\s<>]+>$|^[^@\s<>]+@[^@\s<>]+$/, 'mailFrom must be an address or "Name <address>"'),
  sessionHours: z
    .number()
    .int()
    .min(1, 'sessionHours must be at least 1')
    .max(24 * 30, 'sessionHours must be at most 720'),
});
export type Settings = z.infer<typeof settingsSchema>;
