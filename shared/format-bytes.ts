const UNITS = ['B', 'KiB', 'MiB', 'GiB', 'TiB'];

/** Bytes in binary units, e.g. 1536 → "1.5 KiB", for messages and screens alike. */
export function formatBytes(bytes: number): string {
  let value = bytes;
  let unit = 0;
  while (Math.abs(value) >= 1024 && unit < UNITS.length - 1) {
    value /= 1024;
    unit += 1;
  }
  const digits = unit === 0 || value >= 100 ? 0 : 1;
  return `${value.toFixed(digits)} ${UNITS[unit]}`;
}
