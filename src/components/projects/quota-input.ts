/** Quota sizes as people pick them: a number and a binary unit, or no limit at all. */
export const QUOTA_UNITS = [
  { label: 'MiB', bytes: 1024 ** 2 },
  { label: 'GiB', bytes: 1024 ** 3 },
  { label: 'TiB', bytes: 1024 ** 4 },
] as const;

export interface QuotaDraft {
  unlimited: boolean;
  amount: number;
  unit: number;
}

export function quotaDraft(bytes: number | null): QuotaDraft {
  if (bytes === null) return { unlimited: true, amount: 100, unit: QUOTA_UNITS[1].bytes };
  const unit = [...QUOTA_UNITS].reverse().find((entry) => bytes >= entry.bytes) ?? QUOTA_UNITS[0];
  return { unlimited: false, amount: Math.round((bytes / unit.bytes) * 100) / 100, unit: unit.bytes };
}

export function quotaBytes(draft: QuotaDraft): number | null {
  return draft.unlimited ? null : Math.round(draft.amount * draft.unit);
}
