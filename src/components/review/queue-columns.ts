import type { ReviewSortField } from '../../../shared/schemas/review';

/** A column of the queue table; `field` names the queue's sort key when the column sorts. */
export interface QueueColumn {
  key: string;
  header: string;
  width?: string;
  field?: ReviewSortField;
  numeric?: boolean;
}

/** The queue table's columns after the pick box, sized so that 1440 px needs no sideways scrolling. */
export const QUEUE_COLUMNS: QueueColumn[] = [
  { key: 'clip', header: 'Clip' },
  { key: 'project', header: 'Project · site', width: '14%' },
  { key: 'uploader', header: 'Uploader', width: '8%' },
  { key: 'length', header: 'Length', width: '4.6rem', field: 'durationS' },
  { key: 'flags', header: 'Flags', width: '10%', field: 'flagCount' },
  // Soft hyphens: narrow headers break there rather than widening their column.
  { key: 'sharpness', header: 'Sharp\u00adness', width: '4.9rem', field: 'medianSharpness', numeric: true },
  { key: 'motion', header: 'Motion px', width: '4.9rem', field: 'meanMotion', numeric: true },
  { key: 'consistent', header: 'Consis\u00adtent', width: '4.9rem', field: 'consistentShare', numeric: true },
  { key: 'cuts', header: 'Cuts', width: '4rem', field: 'cutCount', numeric: true },
  { key: 'pairs', header: 'Pairs', width: '4.3rem', field: 'usablePairs', numeric: true },
  { key: 'waiting', header: 'Waiting', width: '5.4rem', field: 'createdAt' },
];

/** How the queue's order (a field, "-" first for descending) sorts a column, in ARIA's words. */
export function sortState(sort: string | undefined, field: string): 'ascending' | 'descending' | 'none' {
  if (sort === field) return 'ascending';
  return sort === `-${field}` ? 'descending' : 'none';
}

/** The order after clicking a column's header: ascending first, then each click turns it round. */
export function nextSort(sort: string | undefined, field: string): string {
  return sortState(sort, field) === 'ascending' ? `-${field}` : field;
}
