import { EntitySchema } from '@mikro-orm/core';
import { projectRoles, type ProjectRole } from '@earmark/contracts';
import { BaseEntity, baseProperties } from './base.js';
import { Project } from './project.entity.js';
import { User } from './user.entity.js';

/** A user's role in one project. */
export class Membership extends BaseEntity<'subscribed'> {
  user!: User;
  project!: Project;
  role!: ProjectRole;
  /**
   * The member's own setting: mail me when a build of this project fails or errors (and when a
   * check drifts). Set from the role on creation and role change (`subscribesToBuildMailByDefault`).
   */
  subscribed = false;
}

export const MembershipSchema = new EntitySchema<Membership, BaseEntity>({
  class: Membership,
  properties: {
    ...baseProperties,
    user: { kind: 'm:1', entity: () => User, deleteRule: 'cascade' },
    project: { kind: 'm:1', entity: () => Project, deleteRule: 'cascade' },
    role: { enum: true, items: () => [...projectRoles], type: 'string' },
    subscribed: { type: 'boolean', default: false },
  },
  uniques: [{ properties: ['user', 'project'] }],
});
