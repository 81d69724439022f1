import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import { afterAll, beforeEach, describe, expect, it } from 'vitest';
import { createHosts, hostsSupport, type Hosts } from '../support/hosts.js';
import { startTcpRelays } from '../support/tcp-relay.js';

/**
 * The simulated hosts of tests/support/hosts.ts (the scale-out test's separate hosts): each its
 * own network namespace, reachable from the root namespace at its address, reaching the root
 * namespace at its gateway (and not its 127.0.0.1), and gone after close().
 */
const support = hostsSupport();
const ipList = (args: string[]) => spawnSync('ip', args, { encoding: 'utf8' }).stdout;
const netns = (pid: number | 'self') => fs.readlinkSync(`/proc/${pid}/ns/net`);

/** A node one-liner in `hosts`' namespace `name`; resolves with the child once it printed `ready`. */
/** Every node started in a host: killed after the file, so a failed assertion leaves none running. */
const started: ChildProcess[] = [];

async function nodeIn(hosts: Hosts, name: string, script: string): Promise<{ child: ChildProcess; output: () => string }> {
  const child = hosts.host(name).exec([process.execPath, '-e', script], { stdio: ['ignore', 'pipe', 'pipe'] });
  started.push(child);
  let text = '';
  child.stdout!.setEncoding('utf8').on('data', (c: string) => (text += c));
  child.stderr!.setEncoding('utf8').on('data', (c: string) => (text += c));
  await new Promise<void>((resolve, reject) => {
    child.stdout!.on('data', () => text.includes('ready') && resolve());
    child.once('exit', (code) => (text.includes('ready') ? resolve() : reject(new Error(`exited ${code} before ready:\n${text}`))));
  });
  return { child, output: () => text };
}

const exitOf = (child: ChildProcess) =>
  child.exitCode !== null || child.signalCode !== null ? Promise.resolve({ code: child.exitCode, signal: child.signalCode }) : new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.once('exit', (code, signal) => resolve({ code, signal })));

describe('simulated hosts (network namespaces joined by veth pairs)', () => {
  let hosts: Hosts | undefined;
  beforeEach((ctx) => {
    if (!support.available) ctx.skip(`simulated hosts are not available here: ${support.reason}`);
  });
  afterAll(() => {
    for (const child of started) if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
    hosts?.close();
  });

  it('makes one namespace per host, each on its own /30 with the root side as gateway', () => {
    hosts = createHosts(['alpha', 'beta']);
    const [alpha, beta] = hosts.hosts as [Hosts['hosts'][0], Hosts['hosts'][0]];
    expect(hosts.hosts.map((h) => h.name)).toEqual(['alpha', 'beta']);
    const listed = ipList(['netns', 'list']);
    for (const h of hosts.hosts) {
      expect(h.namespace).toMatch(new RegExp(`^em${process.pid}h\\d+$`));
      expect(listed).toContain(h.namespace);
      const [a, b, c, d] = h.address.split('.').map(Number) as [number, number, number, number];
      expect([a, b, d % 4]).toEqual([10, 231, 2]);
      expect(h.gateway).toBe(`10.231.${c}.${d - 1}`);
      // Inside: lo and eth0 (the host's side of the pair) up, the address on eth0, a default route.
      expect(ipList(['-n', h.namespace, '-o', '-4', 'addr', 'show', 'eth0'])).toContain(`inet ${h.address}/30`);
      expect(ipList(['-n', h.namespace, 'route', 'show', 'default'])).toContain(`default via ${h.gateway} dev eth0`);
      expect(ipList(['-n', h.namespace, '-o', 'link', 'show', 'lo'])).toMatch(/<[^>]*\bUP\b/);
    }
    expect(alpha.address).not.toBe(beta.address);
    expect(alpha.namespace).not.toBe(beta.namespace);
    expect(() => hosts!.host('gamma')).toThrow(/no host named gamma/);
  });

  it('runs a server in a host that the root namespace reaches at the host address; the child is node itself and signals reach it', async () => {
    const alpha = hosts!.host('alpha');
    const server = await nodeIn(
      hosts!,
      'alpha',
      `require('net').createServer((s) => s.end('hello from ' + s.localAddress + ' to ' + s.remoteAddress)).listen(7001, '${alpha.address}', () => console.log('ready'))`,
    );
    // `ip netns exec` execs: the pid we hold is node's, in another network namespace than ours.
    expect(fs.readlinkSync(`/proc/${server.child.pid}/exe`)).toBe(fs.realpathSync(process.execPath));
    expect(netns(server.child.pid!)).not.toBe(netns('self'));
    const answer = await new Promise<string>((resolve, reject) => {
      let text = '';
      net
        .connect(7001, alpha.address)
        .on('data', (c) => (text += c.toString()))
        .on('end', () => resolve(text))
        .on('error', reject);
    });
    // The root namespace connects from its side of the link (the gateway).
    expect(answer).toBe(`hello from ${alpha.address} to ${alpha.gateway}`);
    server.child.kill('SIGTERM');
    expect(await exitOf(server.child)).toEqual({ code: null, signal: 'SIGTERM' });
  });

  it("reaches the root namespace's loopback-only services only through a relay on the gateway, which sees the host's address", async () => {
    const beta = hosts!.host('beta');
    const service = net.createServer((s) => s.end('pong'));
    await new Promise<void>((resolve) => service.listen(0, '127.0.0.1', resolve));
    const port = (service.address() as net.AddressInfo).port;
    const relays = await startTcpRelays();
    const relay = await relays.relay({ host: beta.gateway }, { host: '127.0.0.1', port });
    try {
      const probe = (host: string, p: number) =>
        `const s = require('net').connect(${p}, '${host}'); let t = ''; s.on('data', (c) => (t += c)); s.on('end', () => console.log('ready ' + t)); s.on('error', (e) => console.log('ready ' + e.code)); s.setTimeout(3000, () => { console.log('ready timeout'); s.destroy(); });`;
      // 127.0.0.1 inside the host is the host's own loopback: nothing listens there.
      const direct = await nodeIn(hosts!, 'beta', probe('127.0.0.1', port));
      await exitOf(direct.child);
      expect(direct.output().trim()).toBe('ready ECONNREFUSED');
      const relayed = await nodeIn(hosts!, 'beta', probe(relay.host, relay.port));
      await exitOf(relayed.child);
      expect(relayed.output().trim()).toBe('ready pong');
      expect(relay.connectionsFrom()).toEqual({ [beta.address]: 1 });
    } finally {
      await relays.close();
      await new Promise((resolve) => service.close(resolve));
    }
  });

  it('close() removes the namespaces and veth pairs, and a second close() is harmless', () => {
    const made = hosts!.hosts.map((h) => h.namespace);
    hosts!.close();
    const listed = ipList(['netns', 'list']);
    for (const ns of made) expect(listed).not.toContain(ns);
    for (const h of hosts!.hosts) expect(ipList(['-o', '-4', 'addr'])).not.toContain(`${h.gateway}/30`);
    expect(() => hosts!.close()).not.toThrow();
  });

  it("removes a namespace left by a test process that died, and keeps a live process's", async () => {
    const dead = spawn(process.execPath, ['-e', '']);
    await exitOf(dead);
    const stale = `em${dead.pid}h0`;
    const live = `em${process.ppid}h0`; // the runner is alive
    for (const ns of [stale, live]) expect(spawnSync('ip', ['netns', 'add', ns]).status).toBe(0);
    try {
      const again = createHosts(['delta']);
      again.close();
      const listed = ipList(['netns', 'list']);
      expect(listed).not.toContain(stale);
      expect(listed).toContain(live);
    } finally {
      spawnSync('ip', ['netns', 'del', stale]);
      spawnSync('ip', ['netns', 'del', live]);
    }
  });
});
