import type { LocationQuery } from 'vue-router';
import type { BulkBodyInput } from '../../../shared/schemas/review';
import type { QueueQueryParams } from '../../api/review';

/**
 * The queue's state lives in the URL so a link shares it: the same names and values the queue API reads, so the
 * route's query goes to the API as it is, and the filter part of it is a bulk action's `filter`.
 */
export const FILTER_KEYS = [
  'projectId',
  'hasFlag',
  'lacksFlag',
  'flagged',
  'site',
  'uploaderId',
  'capturedFrom',
  'capturedTo',
] as const;
export const QUEUE_KEYS = [...FILTER_KEYS, 'page', 'pageSize', 'sort'] as const;

export type FilterKey = (typeof FILTER_KEYS)[number];

/** The queue parameters in a route query; anything else there is left out. */
export function queueParams(query: LocationQuery): QueueQueryParams {
  const params: QueueQueryParams = {};
  for (const key of QUEUE_KEYS) {
    const value = query[key];
    if (typeof value === 'string' && value !== '') params[key] = value;
  }
  return params;
}

/**
 * Only the filter: what "all matching this filter" means for a bulk action. Values stay the URL's text; the server
 * reads them as it reads the queue's query (and refuses anything it would refuse there).
 */
export function filterParams(query: LocationQuery): NonNullable<BulkBodyInput['filter']> {
  const params = queueParams(query);
  return Object.fromEntries(FILTER_KEYS.flatMap((key) => (params[key] ? [[key, params[key]]] : [])));
}

/** A comma-separated list in the URL as an array, and back. */
export const listFromQuery = (value: string | undefined) => (value ? value.split(',').filter(Boolean) : []);
export const listToQuery = (values: readonly string[]) => (values.length > 0 ? values.join(',') : undefined);
