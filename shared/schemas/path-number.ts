import { z } from 'zod';

/**
 * A whole number written in a URL path: decimal digits only. `z.coerce.number()` would also take `0x1`, `1e0`,
 * ` 1` or `1.0` and answer for 1, so one resource would have many addresses.
 */
export function pathNumber(name: string, { min }: { min: 0 | 1 }) {
  const message = min === 1 ? `${name} must be a positive number` : `${name} must be 0 or more`;
  return z
    .string()
    .regex(/^\d{1,10}$/, message)
    .transform(Number)
    .pipe(
      z
        .number()
        .int()
        .min(min, message)
        .max(2 ** 31 - 1, `${name} is too large`),
    );
}
