import type { PairsetState } from '../../../shared/schemas/pairsets';

/** Footage length from hours: minutes below an hour, hours with one decimal above. */
export function formatHours(hours: number): string {
  const minutes = hours * 60;
  if (minutes < 1) return `${Math.round(minutes * 60)} s`;
  if (minutes < 60) return `${minutes.toFixed(1)} min`;
  return `${hours.toFixed(1)} h`;
}

export const STATE_SEVERITY: Record<PairsetState, 'secondary' | 'info' | 'success' | 'danger' | 'warn'> = {
  draft: 'secondary',
  building: 'info',
  built: 'success',
  failed: 'danger',
  cancelled: 'warn',
};
