import type { DrizzleDb } from '../../db';

/**
 * A statement Drizzle builds once per connection and shape (a short key naming which optional
 * parts a query has) and then runs with placeholder values. Reads run on every request, and
 * building their SQL anew each time was a large share of a read's CPU time. Keyed by connection, so
 * a test's or a tool's own database gets statements of its own.
 */
export function preparedPerConnection<T>(build: (db: DrizzleDb, shape: string) => T): (db: DrizzleDb, shape?: string) => T {
  const built = new WeakMap<DrizzleDb, Map<string, T>>();
  return (db, shape = '') => {
    let shapes = built.get(db);
    if (!shapes) built.set(db, (shapes = new Map()));
    let statement = shapes.get(shape);
    if (statement === undefined) shapes.set(shape, (statement = build(db, shape)));
    return statement;
  };
}
