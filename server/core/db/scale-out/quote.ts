/** An identifier in double quotes, as both SQLite and PostgreSQL read it, for names taken from the catalogue. */
export function quote(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}
