import type { MigrationObject } from '@mikro-orm/core';
import { Migration20261202052127 } from './migration-20261202052127.js';
import { Migration20261202054642 } from './migration-20261202054642.js';
import { Migration20261202061204 } from './migration-20261202061204.js';
import { Migration20261202062736 } from './migration-20261202062736.js';
import { Migration20261202143502 } from './migration-20261202143502.js';
import { Migration20261202180000 } from './migration-20261202180000.js';
import { Migration20261202180100 } from './migration-20261202180100.js';
import { Migration20261202180200 } from './migration-20261202180200.js';
import { Migration20261202180300 } from './migration-20261202180300.js';
import { Migration20261202180400 } from './migration-20261202180400.js';
import { Migration20261202190000 } from './migration-20261202190000.js';
import { Migration20261202190100 } from './migration-20261202190100.js';
import { Migration20261202220200 } from './migration-20261202220200.js';
import { Migration20261203030000 } from './migration-20261203030000.js';
import { Migration20261203060000 } from './migration-20261203060000.js';
import { Migration20261203060100 } from './migration-20261203060100.js';

/** Every migration, oldest first. Add each new file here (see DEVELOPERS.md). */
export const migrationsList: MigrationObject[] = [
  { name: 'migration-20261202052127', class: Migration20261202052127 },
  { name: 'migration-20261202054642', class: Migration20261202054642 },
  { name: 'migration-20261202061204', class: Migration20261202061204 },
  { name: 'migration-20261202062736', class: Migration20261202062736 },
  { name: 'migration-20261202143502', class: Migration20261202143502 },
  { name: 'migration-20261202180000', class: Migration20261202180000 },
  { name: 'migration-20261202180100', class: Migration20261202180100 },
  { name: 'migration-20261202180200', class: Migration20261202180200 },
  { name: 'migration-20261202180300', class: Migration20261202180300 },
  { name: 'migration-20261202180400', class: Migration20261202180400 },
  { name: 'migration-20261202190000', class: Migration20261202190000 },
  { name: 'migration-20261202190100', class: Migration20261202190100 },
  { name: 'migration-20261202220200', class: Migration20261202220200 },
  { name: 'migration-20261203030000', class: Migration20261203030000 },
  { name: 'migration-20261203060000', class: Migration20261203060000 },
  { name: 'migration-20261203060100', class: Migration20261203060100 },
];
