/** A foreign key between two tables: rows of `table` name rows of `references`. */
export interface TableReference {
  table: string;
  references: string;
}

/**
 * The tables in an order that copies every referenced table before the tables that reference it (Kahn's
 * topological sort), so each row's foreign keys are already there when it is inserted. Among tables that are ready
 * together the alphabetical first goes first, so every run copies in the same order. A table referencing itself
 * constrains nothing here (its rows go in rowid order). A cycle has no such order: it is an error naming its tables.
 */
export function copyOrder(tables: readonly string[], references: readonly TableReference[]): string[] {
  const known = new Set(tables);
  const waitingFor = new Map(tables.map((table) => [table, new Set<string>()]));
  for (const { table, references: parent } of references) {
    if (table !== parent && known.has(table) && known.has(parent)) waitingFor.get(table)!.add(parent);
  }
  const order: string[] = [];
  while (waitingFor.size > 0) {
    const ready = [...waitingFor].filter(([, parents]) => parents.size === 0).map(([table]) => table);
    if (ready.length === 0) {
      throw new Error(`the foreign keys between ${[...waitingFor.keys()].sort().join(', ')} form a cycle`);
    }
    const next = ready.sort()[0]!;
    order.push(next);
    waitingFor.delete(next);
    for (const parents of waitingFor.values()) parents.delete(next);
  }
  return order;
}
