import { randomUUID } from 'node:crypto';
import { OptionalProps, type EntitySchemaProperty } from '@mikro-orm/core';

/** Columns every entity carries: a UUID key and a creation time. */
export abstract class BaseEntity<Optional extends string = never> {
  /** Properties with defaults, so `em.create` does not demand them. */
  declare [OptionalProps]?: 'id' | 'createdAt' | Optional;
  id: string = randomUUID();
  createdAt: Date = new Date();
}

// Explicit types everywhere: tsx emits no decorator metadata, so nothing may be inferred.
export const baseProperties = {
  id: { type: 'uuid', primary: true },
  createdAt: { type: 'datetime', onCreate: () => new Date() },
} satisfies Record<string, EntitySchemaProperty<unknown, BaseEntity>>;
