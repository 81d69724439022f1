import http from 'node:http';

/**
 * POSTs `body` with node:http and keeps the answer even when the server answers early and
 * closes while the body is still being sent (fetch reports only the write error then; a CI
 * client such as curl shows the answer). Status 0: no answer at all.
 */
export function rawUpload(url: string, token: string, body: Buffer, timeoutMs = 90_000): Promise<{ status: number; contentType: string; text: string; ms: number; writeError: string | null }> {
  const started = performance.now();
  return new Promise((resolve) => {
    let writeError: string | null = null;
    const req = http.request(url, { method: 'POST', headers: { authorization: `Bearer ${token}`, 'content-type': 'audio/wav', 'content-length': body.length }, timeout: timeoutMs }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, contentType: String(res.headers['content-type'] ?? ''), text: Buffer.concat(chunks).toString(), ms: performance.now() - started, writeError }));
      res.on('error', () => resolve({ status: res.statusCode ?? 0, contentType: String(res.headers['content-type'] ?? ''), text: Buffer.concat(chunks).toString(), ms: performance.now() - started, writeError }));
    });
    req.on('error', (error) => {
      writeError = error.message;
      // Wait a moment: the answer may still be on its way.
      setTimeout(() => resolve({ status: 0, contentType: '', text: '', ms: performance.now() - started, writeError }), 500);
    });
    req.on('timeout', () => req.destroy(new Error(`no answer within ${timeoutMs} ms`)));
    req.end(body);
  });
}
