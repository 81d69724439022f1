import type { MigrationObject } from '@mikro-orm/core';
import { Migration20261202052127 } from './migration-20261202052127.js';

/** Every migration, oldest first. Add each new file here (see DEVELOPERS.md). */
export const migrationsList: MigrationObject[] = [
  { name: 'migration-20261202052127', class: Migration20261202052127 },
];
