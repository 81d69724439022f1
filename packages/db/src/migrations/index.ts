import type { MigrationObject } from '@mikro-orm/core';
import { Migration20261202052127 } from './migration-20261202052127.js';
import { Migration20261202054642 } from './migration-20261202054642.js';
import { Migration20261202061204 } from './migration-20261202061204.js';
import { Migration20261202062736 } from './migration-20261202062736.js';
import { Migration20261202143502 } from './migration-20261202143502.js';

/** Every migration, oldest first. Add each new file here (see DEVELOPERS.md). */
export const migrationsList: MigrationObject[] = [
  { name: 'migration-20261202052127', class: Migration20261202052127 },
  { name: 'migration-20261202054642', class: Migration20261202054642 },
  { name: 'migration-20261202061204', class: Migration20261202061204 },
  { name: 'migration-20261202062736', class: Migration20261202062736 },
  { name: 'migration-20261202143502', class: Migration20261202143502 },
];
