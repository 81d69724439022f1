import { CreateProjectRequest, MemberRow, Project, SetMembershipRequest } from '@earmark/contracts';
import { z } from 'zod';
import { parseWith, type ProjectService } from '@earmark/domain';
import { requireProject, requireUser, type RouteDef } from '../http/route.js';

const UserIdParams = z.object({ userId: z.uuid() });

export function projectRoutes(projects: ProjectService): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/projects',
      access: { kind: 'user' },
      summary: 'Projects the caller can see',
      doc: { response: z.object({ items: z.array(Project) }) },
      async handle(ctx) {
        ctx.res.json({ items: await projects.listFor(ctx.em, requireUser(ctx)) });
      },
    },
    {
      method: 'post',
      path: '/api/projects',
      access: { kind: 'admin' },
      summary: 'Create a project',
      doc: { body: CreateProjectRequest, response: Project, status: 201 },
      async handle(ctx) {
        const body = parseWith(CreateProjectRequest, ctx.req.body, 'body');
        ctx.res.status(201).json(await projects.create(ctx.em, body, requireUser(ctx)));
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project',
      access: { kind: 'project', permission: 'project.read' },
      summary: 'One project with counts',
      doc: { response: Project },
      async handle(ctx) {
        ctx.res.json(await projects.describe(ctx.em, requireProject(ctx), requireUser(ctx)));
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project/members',
      access: { kind: 'project', permission: 'project.read' },
      summary: 'Members of a project and their roles',
      doc: { response: z.object({ items: z.array(MemberRow) }) },
      async handle(ctx) {
        ctx.res.json({ items: await projects.members(ctx.em, requireProject(ctx)) });
      },
    },
    {
      method: 'put',
      path: '/api/projects/:project/members',
      access: { kind: 'project', permission: 'project.administer' },
      summary: "Add a user to a project or change their role",
      doc: { body: SetMembershipRequest, response: MemberRow },
      async handle(ctx) {
        const body = parseWith(SetMembershipRequest, ctx.req.body, 'body');
        ctx.res.json(await projects.setMember(ctx.em, requireProject(ctx), body.email, body.role, requireUser(ctx)));
      },
    },
    {
      method: 'delete',
      path: '/api/projects/:project/members/:userId',
      access: { kind: 'project', permission: 'project.administer' },
      summary: 'Remove a user from a project',
      async handle(ctx) {
        const { userId } = parseWith(UserIdParams, ctx.req.params, 'params');
        await projects.removeMember(ctx.em, requireProject(ctx), userId, requireUser(ctx));
        ctx.res.status(204).end();
      },
    },
  ];
}
