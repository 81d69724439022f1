import { buildOpenApiDocument } from '../http/openapi.js';
import { route, type RouteDef } from '../http/route.js';

const escape = (s: string) => s.replace(/[&<>"]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' })[c]!);

interface Operation {
  summary?: string;
  description?: string;
  tags?: string[];
}

/** A plain, server-rendered reference page: no scripts, so it works under the strict CSP. */
function renderDocsPage(document: { paths?: Record<string, Record<string, Operation>> }): string {
  const byTag = new Map<string, string[]>();
  for (const [path, methods] of Object.entries(document.paths ?? {})) {
    for (const [method, op] of Object.entries(methods)) {
      const tag = op.tags?.[0] ?? 'api';
      const row = `<tr><td class="m m-${method}">${method.toUpperCase()}</td><td><code>${escape(path)}</code></td><td>${escape(op.summary ?? '')}<div class="who">${escape(op.description ?? '')}</div></td></tr>`;
      byTag.set(tag, [...(byTag.get(tag) ?? []), row]);
    }
  }
  const sections = [...byTag.entries()]
    .map(([tag, rows]) => `<h2>${escape(tag)}</h2><table>${rows.join('')}</table>`)
    .join('');
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Earmark API reference</title>
<style>body{font:15px/1.5 system-ui,sans-serif;margin:2rem auto;max-width:70rem;color:#1b1d2e;background:#f6f3ec;padding:0 1rem}
h1{margin-bottom:.2rem}table{border-collapse:collapse;width:100%;background:#fffdf8}td{border-top:1px solid #e3ddd0;padding:.45rem .6rem;vertical-align:top}
code{font:13px ui-monospace,monospace}.m{font:600 12px ui-monospace,monospace;width:4.5rem}.m-get{color:#1f5f8b}.m-post{color:#8a5a00}.m-put,.m-patch{color:#6b3fa0}.m-delete{color:#a3281b}
.who{color:#5c6070;font-size:13px}</style></head><body><h1>Earmark API</h1>
<p>The machine-readable OpenAPI 3.1 document is at <a href="/api/v1/openapi.json"><code>/api/v1/openapi.json</code></a>. Errors are <code>application/problem+json</code>. CI routes live under <code>/api/v1</code> and accept project CI tokens.</p>
${sections}</body></html>`;
}

export function docsRoutes(allRoutes: () => RouteDef[], serverUrl: string): RouteDef[] {
  let cached: object | null = null;
  const document = () => (cached ??= buildOpenApiDocument(allRoutes(), serverUrl));
  return [
    route({
      method: 'get',
      path: '/api/v1/openapi.json',
      access: { kind: 'public' },
      summary: 'This API as an OpenAPI 3.1 document',
      async handle({ res }) {
        res.json(document());
      },
    }),
    route({
      method: 'get',
      path: '/api/docs',
      access: { kind: 'public' },
      summary: 'A browsable reference of this API',
      async handle({ res }) {
        res.type('html').send(renderDocsPage(document() as Parameters<typeof renderDocsPage>[0]));
      },
    }),
  ];
}
