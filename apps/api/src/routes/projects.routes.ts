import { CreateProjectRequest, MemberRow, Project, SetMembershipRequest, UpdateProjectRequest } from '@earmark/contracts';
import { z } from 'zod';
import { type ProjectService } from '@earmark/domain';
import { requireProject, requireUser, route, type RouteDef } from '../http/route.js';

const UserIdParams = z.object({ userId: z.uuid() });
const ProjectListQuery = z.object({
  /** `include`: administrators also get archived projects (the admin area). */
  archived: z.enum(['include', 'exclude'], 'include or exclude').default('exclude'),
});

export function projectRoutes(projects: ProjectService): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/api/projects',
      access: { kind: 'user' },
      summary: 'Projects the caller can see; archived ones only for administrators with ?archived=include',
      query: ProjectListQuery,
      response: z.object({ items: z.array(Project) }),
      async handle(ctx) {
        ctx.res.json({ items: await projects.listFor(ctx.em, requireUser(ctx), ctx.query.archived === 'include') });
      },
    }),
    route({
      method: 'post',
      path: '/api/projects',
      access: { kind: 'admin' },
      summary: 'Create a project',
      body: CreateProjectRequest,
      response: Project,
      status: 201,
      async handle(ctx) {
        const body = ctx.body;
        ctx.res.status(201).json(await projects.create(ctx.em, body, requireUser(ctx)));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project',
      access: { kind: 'project', permission: 'project.read' },
      summary: 'One project with counts',
      response: Project,
      async handle(ctx) {
        ctx.res.json(await projects.describe(ctx.em, requireProject(ctx), requireUser(ctx)));
      },
    }),
    route({
      method: 'patch',
      path: '/api/projects/:project',
      access: { kind: 'project', permission: 'project.administer' },
      summary: "Change a project's settings: its name, storage quota (bytes; 0 = unlimited, null = the server default), or archive it (archived: true; false restores it)",
      body: UpdateProjectRequest,
      response: Project,
      async handle(ctx) {
        ctx.res.json(await projects.update(ctx.em, requireProject(ctx), ctx.body, requireUser(ctx)));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/members',
      access: { kind: 'project', permission: 'project.read' },
      summary: 'Members of a project and their roles',
      response: z.object({ items: z.array(MemberRow) }),
      async handle(ctx) {
        ctx.res.json({ items: await projects.members(ctx.em, requireProject(ctx)) });
      },
    }),
    route({
      method: 'put',
      path: '/api/projects/:project/members',
      access: { kind: 'project', permission: 'project.administer' },
      summary: "Add a user to a project or change their role",
      body: SetMembershipRequest,
      response: MemberRow,
      async handle(ctx) {
        const body = ctx.body;
        ctx.res.json(await projects.setMember(ctx.em, requireProject(ctx), body.email, body.role, requireUser(ctx)));
      },
    }),
    route({
      method: 'delete',
      path: '/api/projects/:project/members/:userId',
      access: { kind: 'project', permission: 'project.administer' },
      summary: 'Remove a user from a project',
      params: UserIdParams,
      async handle(ctx) {
        const { userId } = ctx.params;
        await projects.removeMember(ctx.em, requireProject(ctx), userId, requireUser(ctx));
        ctx.res.status(204).end();
      },
    }),
  ];
}
