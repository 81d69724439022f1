import { spawn, spawnSync, type ChildProcess, type SpawnOptions } from 'node:child_process';
import fs from 'node:fs';

/**
 * Simulated hosts on this machine: one Linux network namespace per host, joined to the root
 * namespace by a veth pair on its own /30 (root side .1 = the host's gateway, host side .2).
 * A process in a host sees only its own `lo` and that link, so it cannot reach a service that
 * listens on the root namespace's 127.0.0.1 unless something relays it (tests/support/tcp-relay.ts).
 * Hosts reach the root namespace, not each other (the machine does not forward packets).
 */
export interface Host {
  /** The name the caller gave ("api-a"). */
  name: string;
  /** The network namespace (`em<pid>h<n>`: the pid lets a later run remove it if this one died). */
  namespace: string;
  /** The host's own address, on its side of the veth pair. */
  address: string;
  /** The root namespace's address on the same link: where the host reaches the test's services. */
  gateway: string;
  /**
   * Spawns `argv` inside the host. `ip netns exec` switches namespace and then execs, so the
   * child's pid is the command's own (signals reach it, not a wrapper).
   */
  exec(argv: string[], options?: SpawnOptions): ChildProcess;
}

export interface Hosts {
  hosts: Host[];
  /** The host made for `name`; throws for a name that was not asked for. */
  host(name: string): Host;
  /** Deletes the namespaces and their veth pairs. Idempotent; also runs when the process exits. */
  close(): void;
}

// 10.231.0.0/16 (RFC 1918 private space, unused on the CI machine) cut into /30s: slot s is
// 10.231.(s >> 6).(4 × (s & 63)). A slot is claimed by creating its root-side link `emr<s>`:
// the kernel refuses a second link of that name, so parallel test processes never share a subnet.
const SLOTS = 16384;
const NAMESPACE = /^em(\d+)h(\d+|probe)$/;
let nextHostIndex = 0;

type Support = { available: true } | { available: false; reason: string };
let support: Support | undefined;
let ipPath = 'ip';

/**
 * Whether hosts can be made here: root, an `ip` command, and a probe namespace with a veth pair
 * inside it that the kernel accepts. The answer is computed once per process.
 */
export function hostsSupport(): Support {
  support ??= probe();
  return support;
}

export function hostsAvailable(): boolean {
  return hostsSupport().available;
}

function probe(): Support {
  if (process.platform !== 'linux') return { available: false, reason: `network namespaces are Linux only (this is ${process.platform})` };
  if (process.getuid?.() !== 0) return { available: false, reason: 'not running as root (ip netns needs CAP_SYS_ADMIN)' };
  const found = ['/usr/sbin/ip', '/sbin/ip', '/usr/bin/ip', '/bin/ip'].find((p) => fs.existsSync(p));
  if (!found) return { available: false, reason: 'the ip command (iproute2) is not installed' };
  ipPath = found;
  const name = `em${process.pid}hprobe`;
  const made = ip(['netns', 'add', name]);
  if (made.status !== 0) return { available: false, reason: `ip netns add failed: ${made.stderr.trim()}` };
  try {
    const veth = ip(['-n', name, 'link', 'add', 'name', 'probe0', 'type', 'veth', 'peer', 'name', 'probe1']);
    if (veth.status !== 0) return { available: false, reason: `a veth pair cannot be made: ${veth.stderr.trim()}` };
    return { available: true };
  } finally {
    ip(['netns', 'del', name]);
  }
}

/** Creates one host per name. Throws when hosts are not available (check hostsSupport first). */
export function createHosts(names: string[]): Hosts {
  const state = hostsSupport();
  if (!state.available) throw new Error(`simulated hosts are not available: ${state.reason}`);
  if (new Set(names).size !== names.length) throw new Error(`createHosts: names must be unique (${names.join(', ')})`);
  removeStaleHosts();
  const hosts: Host[] = [];
  const made: Array<{ namespace: string; link?: string }> = []; // what close() removes
  let closed = false;
  const close = () => {
    if (closed) return;
    closed = true;
    process.off('exit', close);
    // Deleting the root side removes the pair at once; the namespace itself lingers in the
    // kernel only while a process still runs in it.
    for (const m of made) {
      if (m.link) ip(['link', 'del', m.link]);
      ip(['netns', 'del', m.namespace]);
    }
  };
  process.on('exit', close);
  try {
    let slot = 0;
    for (const name of names) {
      const namespace = `em${process.pid}h${nextHostIndex++}`;
      run(['netns', 'add', namespace]);
      const record: { namespace: string; link?: string } = { namespace };
      made.push(record);
      // Claim the first free slot: the link is created with its peer already inside the namespace.
      for (; ; slot++) {
        if (slot >= SLOTS) throw new Error('createHosts: every 10.231.0.0/16 slot is taken');
        const res = ip(['link', 'add', 'name', `emr${slot}`, 'type', 'veth', 'peer', 'name', 'eth0', 'netns', namespace]);
        if (res.status === 0) break;
        if (!res.stderr.includes('File exists')) throw new Error(`ip link add emr${slot} failed: ${res.stderr.trim()}`);
      }
      const link = `emr${slot}`;
      record.link = link;
      const prefix = `10.231.${slot >> 6}.`;
      const gateway = `${prefix}${4 * (slot & 63) + 1}`;
      const address = `${prefix}${4 * (slot & 63) + 2}`;
      slot++;
      run(['addr', 'add', `${gateway}/30`, 'dev', link]);
      run(['link', 'set', link, 'up']);
      run(['-n', namespace, 'link', 'set', 'lo', 'up']);
      run(['-n', namespace, 'addr', 'add', `${address}/30`, 'dev', 'eth0']);
      run(['-n', namespace, 'link', 'set', 'eth0', 'up']);
      run(['-n', namespace, 'route', 'add', 'default', 'via', gateway]);
      hosts.push({ name, namespace, address, gateway, exec: (argv, options = {}) => spawn(ipPath, ['netns', 'exec', namespace, ...argv], options) });
    }
  } catch (error) {
    close();
    throw error;
  }
  return {
    hosts,
    host(name) {
      const found = hosts.find((h) => h.name === name);
      if (!found) throw new Error(`no host named ${name} (made: ${names.join(', ')})`);
      return found;
    },
    close,
  };
}

/**
 * Namespaces left by an earlier test process that died before its close() (SIGKILL, a crash):
 * the pid in the name is no longer running. Their veth pairs go with them.
 */
function removeStaleHosts(): void {
  const listed = ip(['netns', 'list']).stdout.split('\n').map((l) => l.split(' ')[0]!);
  for (const namespace of listed) {
    const pid = Number(NAMESPACE.exec(namespace)?.[1]);
    if (!pid || pid === process.pid || isRunning(pid)) continue;
    const peers = ip(['-o', 'link', 'show', 'type', 'veth']).stdout.split('\n').filter((l) => l.includes(`link-netns ${namespace}`));
    for (const line of peers) {
      const link = /^\d+: (emr\d+)@/.exec(line)?.[1];
      if (link) ip(['link', 'del', link]);
    }
    ip(['netns', 'del', namespace]);
  }
}

function isRunning(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function ip(args: string[]) {
  // C locale: a taken slot is recognised by the kernel's "File exists".
  return spawnSync(ipPath, args, { encoding: 'utf8', env: { ...process.env, LC_ALL: 'C' } });
}

function run(args: string[]): void {
  const res = ip(args);
  if (res.status !== 0) throw new Error(`ip ${args.join(' ')} failed (${res.status}): ${res.stderr.trim()}`);
}
