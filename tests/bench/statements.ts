import { db } from "~/.server/db";

/** Counts the SQL statements `fn` sends through Sequelize (models and raw queries alike). */
export async function countStatements<T>(fn: () => Promise<T>): Promise<{ result: T; statements: number }> {
  const sequelize = db();
  const original = sequelize.query.bind(sequelize);
  let statements = 0;
  (sequelize as unknown as { query: typeof original }).query = ((...args: Parameters<typeof original>) => {
    statements++;
    return original(...args);
  }) as typeof original;
  try {
    return { result: await fn(), statements };
  } finally {
    delete (sequelize as unknown as { query?: unknown }).query;
  }
}
