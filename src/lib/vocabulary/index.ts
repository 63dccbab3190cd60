/**
 * Plateau's vocabulary, declared once: the value lists (Drizzle enums and zod schemas are
 * built from them) and the one label each value has in the UI, mail and calendar feeds.
 */
export * from './feed';
export * from './forecast';
export * from './reading';
export * from './roles';
export * from './run';
export * from './still';
export * from './units';
export * from './wash';
