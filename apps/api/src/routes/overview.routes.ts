import { ProjectOverview } from '@earmark/contracts';
import { projectOverview } from '@earmark/domain';
import { roleGrants, type ProjectPermission } from '../auth/permissions.js';
import { requireProject, requireUser, route, type RouteDef } from '../http/route.js';

/** The project's landing page: main's verdict, branch trends, failing since when, drift, what awaits the caller. */
export function overviewRoutes(): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/api/projects/:project/overview',
      access: { kind: 'project', permission: 'build.read' },
      summary: "Main's verdict, each branch's trend, checks failing on main since which build, drifting checks, and the reviews and waivers awaiting the caller",
      response: ProjectOverview,
      async handle(ctx) {
        const project = requireProject(ctx);
        const { user, memberships } = requireUser(ctx);
        // Which decisions the caller's role allows, from the one permission matrix (admins hold them all).
        const role = memberships.find((m) => m.project.id === project.id)?.role;
        const holds = (permission: ProjectPermission) => user.isAdmin || (role !== undefined && roleGrants(role, permission));
        ctx.res.json(await projectOverview(ctx.em, project, { user, mayDecideRevisions: holds('mask.approve'), mayDecideWaivers: holds('waiver.decide') }));
      },
    }),
  ];
}
