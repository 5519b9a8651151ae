import { timestamp } from 'drizzle-orm/pg-core';

/** Creation and update stamps shared by most tables (spread into a table's columns). */
export const timestamps = {
  createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
};
