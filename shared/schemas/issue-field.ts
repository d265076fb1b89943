import type { z } from 'zod';

/**
 * The field a zod issue is about, as a path. An unknown key is named by its own path (`flagThresholds.darkMeanLumma`)
 * rather than by the object that holds it; `unknownKeys` lists every key the object did not expect.
 */
export function issueField(issue: z.ZodError['issues'][number]): { path: string[]; unknownKeys: string[] } {
  const unknownKeys = issue.code === 'unrecognized_keys' ? issue.keys.map(String) : [];
  return { path: [...issue.path.map(String), ...unknownKeys.slice(0, 1)], unknownKeys };
}
