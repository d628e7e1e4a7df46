// Types for migrate.js, for the TypeScript that imports it (tests).

/** Runs every pending migration in drizzle/ against the database at `url` (a user with DDL rights). */
export declare function applyMigrations(url: string): Promise<void>;
