import type { EntityManager } from '@mikro-orm/postgresql';
import { boundOf, type AuditEntityRef, type WorkspaceAuditPage, type WorkspaceAuditQuery } from '@earmark/contracts';
import { ApiToken, AuditEvent, Build, Capture, Finding, Project, Target, TestCase, User, Waiver } from '@earmark/db';

const likeLiteral = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);
const enc = encodeURIComponent;

function split(ref: string): { kind: string; id: string } {
  const at = ref.indexOf(':');
  return at < 0 ? { kind: ref, id: '' } : { kind: ref.slice(0, at), id: ref.slice(at + 1) };
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The names of everything one page of events mentions, looked up with one query per kind. */
class NameBook {
  users = new Map<string, User>();
  tokens = new Map<string, ApiToken>();
  projects = new Map<string, Project>();
  builds = new Map<string, Build>();
  captures = new Map<string, Capture>();
  findings = new Map<string, Finding>();
  waivers = new Map<string, Waiver>();
  testCases = new Map<string, TestCase>();
  targets = new Map<string, Target>();

  static async load(em: EntityManager, events: AuditEvent[]): Promise<NameBook> {
    const book = new NameBook();
    const ids = (kind: string) => [...new Set(events.flatMap((e) => [e.actor, e.subject]).map(split).filter((r) => r.kind === kind).map((r) => r.id))];
    const uuids = (kind: string) => ids(kind).filter((id) => UUID.test(id));
    const projectIds = [...new Set(events.map((e) => e.project?.id).filter((id): id is string => !!id))];
    const [users, tokens, projects, builds, captures, findings, waivers, testCases, targets] = await Promise.all([
      em.find(User, { email: { $in: ids('user') } }),
      em.find(ApiToken, { prefix: { $in: ids('token') } }, { populate: ['project'] }),
      em.find(Project, { $or: [{ key: { $in: ids('project') } }, { id: { $in: projectIds } }] }),
      em.find(Build, { sha: { $in: ids('build') }, project: { $in: projectIds } }),
      em.find(Capture, { id: { $in: uuids('capture') } }, { populate: ['build', 'testCase', 'target', 'project'] }),
      em.find(Finding, { id: { $in: uuids('finding') } }, { populate: ['capture.testCase', 'capture.target', 'project'] }),
      em.find(Waiver, { id: { $in: uuids('waiver') } }, { populate: ['testCase', 'target', 'project'] }),
      em.find(TestCase, { project: { $in: projectIds }, key: { $in: [...ids('test-case'), ...ids('mask').map((m) => m.split('#')[0] ?? '')] } }),
      em.find(Target, { project: { $in: projectIds }, key: { $in: ids('target') } }),
    ]);
    for (const u of users) book.users.set(u.email, u);
    for (const t of tokens) book.tokens.set(t.prefix, t);
    for (const p of projects) book.projects.set(p.key, p);
    for (const b of builds) book.builds.set(`${b.project.id}/${b.sha}`, b);
    for (const c of captures) book.captures.set(c.id, c);
    for (const f of findings) book.findings.set(f.id, f);
    for (const w of waivers) book.waivers.set(w.id, w);
    for (const c of testCases) book.testCases.set(`${c.project.id}/${c.key}`, c);
    for (const t of targets) book.targets.set(`${t.project.id}/${t.key}`, t);
    return book;
  }

  /** A display name and in-app page for one stored reference; what cannot be found keeps its raw id. */
  ref(raw: string, project: Project | null): AuditEntityRef {
    const { kind, id } = split(raw);
    const p = project;
    const pk = p ? enc(p.key) : '';
    const make = (label: string, href: string | null): AuditEntityRef => ({ ref: raw, kind, label, href });
    switch (kind) {
      case 'user': {
        const u = this.users.get(id);
        return make(u ? u.displayName : id, u ? `/admin/users?user=${enc(u.email)}` : null);
      }
      case 'token': {
        const t = this.tokens.get(id);
        return make(t ? `CI token “${t.name}”` : `CI token ${id}`, t ? `/projects/${enc(t.project.key)}/tokens` : null);
      }
      case 'project': {
        const found = this.projects.get(id);
        return make(found ? found.name : id, found ? `/projects/${enc(found.key)}` : null);
      }
      case 'build': {
        const b = p ? this.builds.get(`${p.id}/${id}`) : undefined;
        return make(`build ${id.slice(0, 7)}${b?.branch ? ` on ${b.branch}` : ''}`, b && p ? `/projects/${pk}/builds/${enc(b.sha)}` : null);
      }
      case 'capture': {
        const c = this.captures.get(id);
        return c
          ? make(`${c.testCase.name} on ${c.target.name} (build ${c.build.sha.slice(0, 7)})`, `/projects/${enc(c.project.key)}/builds/${enc(c.build.sha)}/captures/${enc(c.id)}`)
          : make(`capture ${id.slice(0, 8)}`, null);
      }
      case 'finding': {
        const f = this.findings.get(id);
        return f
          ? make(`${f.checkId} on ${f.capture.testCase.name} / ${f.capture.target.name}`, `/projects/${enc(f.project.key)}/findings?captureId=${enc(f.capture.id)}`)
          : make(`finding ${id.slice(0, 8)}`, null);
      }
      case 'waiver': {
        const w = this.waivers.get(id);
        return w
          ? make(`waiver of ${w.checkId} on ${w.testCase.name}${w.target ? ` / ${w.target.name}` : ''}`, `/projects/${enc(w.project.key)}/approvals`)
          : make(`waiver ${id.slice(0, 8)}`, null);
      }
      case 'mask': {
        const [caseKey = '', revision = ''] = id.split('#');
        const c = p ? this.testCases.get(`${p.id}/${caseKey}`) : undefined;
        return make(`${c?.name ?? caseKey} mask, revision ${revision}`, c && p ? `/projects/${pk}/test-cases/${enc(caseKey)}/masks?revision=${enc(revision)}` : null);
      }
      case 'test-case': {
        const c = p ? this.testCases.get(`${p.id}/${id}`) : undefined;
        return make(c ? c.name : id, c && p ? `/projects/${pk}/test-cases/${enc(id)}/masks` : null);
      }
      case 'target': {
        const t = p ? this.targets.get(`${p.id}/${id}`) : undefined;
        return make(t ? t.name : id, t && p ? `/projects/${pk}/builds?target=${enc(id)}` : null);
      }
      case 'anonymous':
        return make('Someone not signed in', null);
      default:
        return make(id ? `${kind} ${id}` : kind, null);
    }
  }
}

/**
 * The workspace audit log for administrators: every project's events and the workspace's own
 * (people, sign-ins), filtered, newest first, with the names of who acted and on what.
 */
export async function workspaceAudit(em: EntityManager, q: WorkspaceAuditQuery): Promise<WorkspaceAuditPage> {
  const where: Record<string, unknown> = {};
  if (q.actor) where.actor = q.actor.includes(':') ? q.actor : `user:${q.actor.toLowerCase()}`;
  if (q.action) where.action = q.action.endsWith('.') ? { $like: `${likeLiteral(q.action)}%` } : q.action;
  if (q.project) where.project = { key: q.project };
  const createdAt: Record<string, Date> = {};
  if (q.from) createdAt.$gte = boundOf(q.from, 'start');
  if (q.to) createdAt.$lte = boundOf(q.to, 'end');
  if (q.from || q.to) where.createdAt = createdAt;
  const [events, total] = await em.findAndCount(AuditEvent, where, {
    populate: ['project'],
    orderBy: { createdAt: 'desc', id: 'desc' },
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  const book = await NameBook.load(em, events);
  return {
    items: events.map((e) => ({
      id: e.id,
      at: e.createdAt.toISOString(),
      action: e.action,
      actor: e.actor,
      subject: e.subject,
      actorRef: book.ref(e.actor, e.project),
      subjectRef: book.ref(e.subject, e.project),
      projectKey: e.project?.key ?? null,
      projectName: e.project?.name ?? null,
      details: e.details,
    })),
    total,
    page: q.page,
    pageSize: q.pageSize,
  };
}
