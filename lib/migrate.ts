/** Runs the migrations in migrations/ with umzug; safe to run again (applied ones are skipped). */
import path from 'node:path';
import { Umzug, SequelizeStorage } from 'umzug';
import { getSequelize } from '@/lib/db';

export function migrator() {
  const sequelize = getSequelize();
  return new Umzug({
    migrations: {
      glob: ['migrations/*.ts', { cwd: path.resolve(__dirname, '..') }],
      // Import from here (not from inside umzug) so whichever TypeScript loader runs us (tsx, vitest) applies.
      resolve: ({ name, path: file, context }) => ({
        name,
        up: async () => (await import(file!)).up({ context }),
        down: async () => (await import(file!)).down({ context }),
      }),
    },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

export async function migrate(): Promise<string[]> {
  const done = await migrator().up();
  return done.map((m) => m.name);
}
