import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Finding } from './finding.entity.js';
import { User } from './user.entity.js';

export class Comment extends BaseEntity {
  finding!: Finding;
  author!: User;
  body!: string;
}

export const CommentSchema = new EntitySchema<Comment, BaseEntity>({
  class: Comment,
  properties: {
    ...baseProperties,
    finding: { kind: 'm:1', entity: () => Finding, deleteRule: 'cascade', index: true },
    author: { kind: 'm:1', entity: () => User },
    body: { type: 'text' },
  },
});
