import { describe, expect, it } from 'vitest';
import { columnKind, sqliteInstant, toPostgres } from '../../server/core/db/scale-out/column-values';
import { copyOrder, type TableReference } from '../../server/core/db/scale-out/copy-order';

/**
 * The two computations of the SQLite → PostgreSQL copy that need no database: the order tables are copied in
 * (a topological sort of the foreign keys) and the conversion of SQLite's values to PostgreSQL's column types.
 */
describe('the copy order', () => {
  /**
   * The dressing example of Cormen, Leiserson, Rivest and Stein, Introduction to Algorithms (3rd ed.), section 22.4,
   * figure 22.7 (edges from memory): each garment must go on before the ones listed after it. A topological order is
   * one where every edge points forward; ties broken alphabetically give exactly one such order, worked by hand with
   * Kahn's algorithm (Kahn 1962, "Topological sorting of large networks", CACM 5(11)).
   */
  const before: [string, string][] = [
    ['undershorts', 'pants'],
    ['undershorts', 'shoes'],
    ['pants', 'belt'],
    ['pants', 'shoes'],
    ['belt', 'jacket'],
    ['shirt', 'belt'],
    ['shirt', 'tie'],
    ['tie', 'jacket'],
    ['socks', 'shoes'],
  ];
  const garments = ['belt', 'jacket', 'pants', 'shirt', 'shoes', 'socks', 'tie', 'undershorts', 'watch'];
  const references: TableReference[] = before.map(([first, then]) => ({ table: then, references: first }));

  it('puts every referenced table before the tables that reference it', () => {
    const order = copyOrder(garments, references);
    expect([...order].sort()).toEqual(garments);
    for (const [first, then] of before)
      expect(order.indexOf(first), `${first} → ${then}`).toBeLessThan(order.indexOf(then));
  });

  it('breaks ties alphabetically, so every run copies in the same order', () => {
    expect(copyOrder(garments, references)).toEqual([
      'shirt',
      'socks',
      'tie',
      'undershorts',
      'pants',
      'belt',
      'jacket',
      'shoes',
      'watch',
    ]);
    expect(copyOrder([...garments].reverse(), [...references].reverse())).toEqual(copyOrder(garments, references));
  });

  it('ignores a table referencing itself and references to tables not copied, and names a cycle', () => {
    expect(
      copyOrder(
        ['clips', 'users'],
        [
          { table: 'clips', references: 'clips' },
          { table: 'clips', references: 'users' },
          { table: 'users', references: 'schema_migrations' },
        ],
      ),
    ).toEqual(['users', 'clips']);
    expect(() =>
      copyOrder(
        ['a', 'b', 'c'],
        [
          { table: 'a', references: 'b' },
          { table: 'b', references: 'a' },
        ],
      ),
    ).toThrow('the foreign keys between a, b form a cycle');
  });
});

describe("SQLite's values in PostgreSQL's columns", () => {
  it('reads the column kinds from information_schema data types (PostgreSQL documentation, "columns" view)', () => {
    expect(columnKind('boolean')).toBe('boolean');
    expect(columnKind('timestamp with time zone')).toBe('timestamp');
    expect(columnKind('json')).toBe('json');
    expect(columnKind('bytea')).toBe('bytes');
    for (const other of ['integer', 'bigint', 'double precision', 'character varying', 'text']) {
      expect(columnKind(other)).toBe('plain');
    }
  });

  it("reads dates as Sequelize's SQLite dialect stores and reads them, and SQLite's own UTC text", () => {
    // Sequelize (lib/dialects/sqlite/data-types.js, DATE) writes 'YYYY-MM-DD HH:MM:SS.SSS +00:00' and reads text
    // without a '+' as UTC; SQLite's datetime() writes UTC without a zone (SQLite documentation, "Date And Time
    // Functions"); a day alone is midnight UTC (ECMA-262, Date Time String Format).
    expect(sqliteInstant('2026-04-07 09:15:00.250 +00:00')?.toISOString()).toBe('2026-04-07T09:15:00.250Z');
    expect(sqliteInstant('2026-04-07 09:15:00.250 +02:00')?.toISOString()).toBe('2026-04-07T07:15:00.250Z');
    expect(sqliteInstant('2026-04-07 09:15:00.250 -05:00')?.toISOString()).toBe('2026-04-07T14:15:00.250Z');
    expect(sqliteInstant('2026-04-07 09:15:00')?.toISOString()).toBe('2026-04-07T09:15:00.000Z');
    expect(sqliteInstant('2026-04-07T09:15:00.000Z')?.toISOString()).toBe('2026-04-07T09:15:00.000Z');
    expect(sqliteInstant('2026-04-07')?.toISOString()).toBe('2026-04-07T00:00:00.000Z');
    expect(sqliteInstant('last Tuesday')).toBeNull();
  });

  it('turns 0/1 into booleans, date text into ISO instants, and keeps JSON text as written', () => {
    expect(toPostgres(1, 'boolean')).toBe(true);
    expect(toPostgres(0, 'boolean')).toBe(false);
    expect(toPostgres('2026-04-07 09:15:00.250 +00:00', 'timestamp')).toBe('2026-04-07T09:15:00.250Z');
    expect(toPostgres('{"b": 1,  "a": [2]}', 'json')).toBe('{"b": 1,  "a": [2]}');
    // A column declared JSON has numeric affinity in SQLite (SQLite documentation, "Datatypes", 3.1 rule 5): a
    // bare number comes back as a number.
    expect(toPostgres(42, 'json')).toBe('42');
    const bytes = Buffer.from([0, 1, 254, 255]);
    expect(toPostgres(bytes, 'bytes')).toBe(bytes);
    expect(toPostgres(3.25, 'plain')).toBe(3.25);
    expect(toPostgres('Terrace north', 'plain')).toBe('Terrace north');
    for (const kind of ['boolean', 'timestamp', 'json', 'bytes', 'plain'] as const)
      expect(toPostgres(null, kind)).toBeNull();
  });

  it('refuses values with no meaning in their column, saying what was found', () => {
    expect(() => toPostgres(2, 'boolean')).toThrow('2 is not a boolean (0 or 1)');
    expect(() => toPostgres('yesterday', 'timestamp')).toThrow('"yesterday" is not a date');
    expect(() => toPostgres(1775110500123, 'timestamp')).toThrow('1775110500123 is not a date');
    expect(() => toPostgres(Buffer.from('x'), 'json')).toThrow('1 bytes is not JSON text');
    expect(() => toPostgres('abc', 'bytes')).toThrow('"abc" is not bytes');
    expect(() => toPostgres(Buffer.from('ab'), 'plain')).toThrow('2 bytes in a column that holds no bytes');
  });
});
