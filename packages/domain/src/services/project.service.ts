import type { EntityManager } from '@mikro-orm/postgresql';
import { subscribesToBuildMailByDefault, type UpdateProjectRequest, type CreateProjectRequest, type MemberRow, type Project as ProjectDto, type ProjectRole } from '@earmark/contracts';
import { Membership, Project, User } from '@earmark/db';
import type { Principal } from '../actor.js';
import { actorName } from '../actor.js';
import { ConflictError, NotFoundError } from '../errors.js';
import { recordAudit } from './audit.service.js';
import { assertKeepsAQaManager } from '../rules/last-admin.js';
import { effectiveQuota, storageUsedBytes, type EffectiveQuota } from '../lifecycle/storage-quota.js';

interface ProjectCounts {
  project_id: string;
  targets: string;
  test_cases: string;
  builds: string;
}

/** Counts for the projects list in one query rather than three per project. */
async function countsFor(em: EntityManager, projectIds: string[]): Promise<Map<string, ProjectCounts>> {
  if (projectIds.length === 0) return new Map();
  const rows = await em.getConnection().execute<ProjectCounts[]>(
    `select p.id as project_id,
            (select count(*) from target t where t.project_id = p.id) as targets,
            (select count(*) from test_case c where c.project_id = p.id) as test_cases,
            (select count(*) from build b where b.project_id = p.id) as builds
       from project p where p.id in (${projectIds.map(() => '?').join(',')})`,
    projectIds,
  );
  return new Map(rows.map((r) => [r.project_id, r]));
}

function toDto(project: Project, myRole: ProjectDto['myRole'], counts: ProjectCounts | undefined, storage: { usedBytes: number; quota: EffectiveQuota }): ProjectDto {
  return {
    key: project.key,
    name: project.name,
    description: project.description,
    createdAt: project.createdAt.toISOString(),
    myRole,
    targetCount: Number(counts?.targets ?? 0),
    testCaseCount: Number(counts?.test_cases ?? 0),
    buildCount: Number(counts?.builds ?? 0),
    storageUsedBytes: storage.usedBytes,
    storageQuotaBytes: storage.quota.bytes,
    storageQuotaSource: storage.quota.source,
    archivedAt: project.archivedAt?.toISOString() ?? null,
  };
}

export class ProjectService {
  /** @param storageQuotaDefaultBytes the quota of projects without their own (EARMARK_PROJECT_QUOTA_BYTES; 0 or unset: unlimited) */
  constructor(private readonly storageQuotaDefaultBytes?: number) {}

  private storage(project: Project, used: Map<string, number>) {
    return { usedBytes: used.get(project.id) ?? 0, quota: effectiveQuota(project, this.storageQuotaDefaultBytes) };
  }

  /**
   * Projects the user can see: all for admins, their memberships otherwise. Archived projects
   * leave the list; admins ask for them with `includeArchived` (the admin area).
   */
  async listFor(em: EntityManager, principal: Extract<Principal, { kind: 'user' }>, includeArchived = false): Promise<ProjectDto[]> {
    const roleByProject = new Map(principal.memberships.map((m) => [m.project.id, m.role] as const));
    const projects = (
      principal.user.isAdmin
        ? await em.find(Project, {}, { orderBy: { name: 'asc' } })
        : principal.memberships.map((m) => m.project).sort((a, b) => a.name.localeCompare(b.name))
    ).filter((p) => !p.archivedAt || (includeArchived && principal.user.isAdmin));
    const ids = projects.map((p) => p.id);
    const [counts, used] = [await countsFor(em, ids), await storageUsedBytes(em, ids)];
    return projects.map((p) => toDto(p, roleByProject.get(p.id) ?? 'admin', counts.get(p.id), this.storage(p, used)));
  }

  async describe(em: EntityManager, project: Project, principal: Principal): Promise<ProjectDto> {
    const [counts, used] = [await countsFor(em, [project.id]), await storageUsedBytes(em, [project.id])];
    const role =
      principal.kind === 'user' ? (principal.memberships.find((m) => m.project.id === project.id)?.role ?? 'admin') : 'viewer';
    return toDto(project, role, counts.get(project.id), this.storage(project, used));
  }

  /**
   * Changes a project's settings (administrators): its storage quota. Audited with the old value.
   * Lowering the quota below what is stored refuses only the next uploads; nothing stored is removed.
   */
  async update(em: EntityManager, project: Project, input: UpdateProjectRequest, principal: Principal): Promise<ProjectDto> {
    if (input.archived !== undefined && input.archived !== (project.archivedAt !== null)) {
      recordAudit(em, { actor: actorName(principal), action: input.archived ? 'project.archive' : 'project.restore', subject: `project:${project.key}`, project });
      project.archivedAt = input.archived ? new Date() : null;
    }
    if (input.name !== undefined && input.name !== project.name) {
      recordAudit(em, { actor: actorName(principal), action: 'project.rename', subject: `project:${project.key}`, project, change: { before: { name: project.name }, after: { name: input.name } } });
      project.name = input.name;
    }
    await em.flush();
    if (input.storageQuotaBytes !== undefined && input.storageQuotaBytes !== project.storageQuotaBytes) {
      recordAudit(em, {
        actor: actorName(principal),
        action: 'project.storage-quota',
        subject: `project:${project.key}`,
        project,
        details: { from: project.storageQuotaBytes, to: input.storageQuotaBytes },
      });
      project.storageQuotaBytes = input.storageQuotaBytes;
      await em.flush();
    }
    return this.describe(em, project, principal);
  }

  /** @throws ConflictError when the key is taken. */
  async create(em: EntityManager, input: CreateProjectRequest, principal: Principal): Promise<ProjectDto> {
    if (await em.findOne(Project, { key: input.key })) throw new ConflictError(`A project with key ${input.key} already exists.`);
    const project = em.create(Project, { key: input.key, name: input.name, description: input.description });
    recordAudit(em, { actor: actorName(principal), action: 'project.create', subject: `project:${input.key}`, project });
    await em.flush();
    return toDto(project, 'admin', undefined, this.storage(project, new Map()));
  }

  async members(em: EntityManager, project: Project): Promise<MemberRow[]> {
    const rows = await em.find(Membership, { project }, { populate: ['user'], orderBy: { user: { displayName: 'asc' } } });
    return rows.map((m) => ({ userId: m.user.id, email: m.user.email, displayName: m.user.displayName, role: m.role }));
  }

  /** Adds the user to the project or changes their role. @throws NotFoundError for an unknown e-mail. */
  async setMember(em: EntityManager, project: Project, email: string, role: ProjectRole, principal: Principal): Promise<MemberRow> {
    const user = await em.findOne(User, { email: email.toLowerCase() });
    if (!user) throw new NotFoundError(`There is no user with e-mail ${email}.`);
    let membership = await em.findOne(Membership, { project, user });
    const previous = membership?.role ?? null;
    // A new membership, or a new role, starts with the role's build-mail default; the member may change it after.
    if (!membership) membership = em.create(Membership, { project, user, role, subscribed: subscribesToBuildMailByDefault(role) });
    else if (membership.role !== role) {
      assertKeepsAQaManager({ role: membership.role, email: user.email }, role, await em.count(Membership, { project, role: 'qa_manager' }), project.key);
      membership.role = role;
      membership.subscribed = subscribesToBuildMailByDefault(role);
    }
    recordAudit(em, { actor: actorName(principal), action: 'membership.set', subject: `user:${user.email}`, project, details: { role, previous } });
    await em.flush();
    return { userId: user.id, email: user.email, displayName: user.displayName, role };
  }

  /** @throws NotFoundError when the user is not a member. */
  async removeMember(em: EntityManager, project: Project, userId: string, principal: Principal): Promise<void> {
    const membership = await em.findOne(Membership, { project, user: { id: userId } }, { populate: ['user'] });
    if (!membership) throw new NotFoundError(`That user is not a member of ${project.key}.`);
    assertKeepsAQaManager({ role: membership.role, email: membership.user.email }, null, await em.count(Membership, { project, role: 'qa_manager' }), project.key);
    recordAudit(em, { actor: actorName(principal), action: 'membership.remove', subject: `user:${membership.user.email}`, project });
    em.remove(membership);
    await em.flush();
  }
}
