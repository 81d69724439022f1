// The relay process of tests/support/tcp-relay.ts: plain JavaScript, started with fork() and no
// loaders, so the test runner's own work (uploads, polling) never delays the bytes it carries.
import net from 'node:net';

const servers = new Set();
const sockets = new Set();

process.on('message', (m) => {
  if (m.type !== 'listen') return;
  const server = net.createServer((client) => {
    process.send({ type: 'accepted', id: m.id, source: client.remoteAddress ?? 'unknown' });
    const upstream = net.connect(m.target.port, m.target.host);
    // No Nagle on either side: a relay must not hold back a query's last bytes for an ACK.
    client.setNoDelay(true);
    upstream.setNoDelay(true);
    sockets.add(client).add(upstream);
    const drop = () => {
      client.destroy();
      upstream.destroy();
      sockets.delete(client);
      sockets.delete(upstream);
    };
    client.on('error', drop).on('close', drop);
    upstream.on('error', drop).on('close', drop);
    client.pipe(upstream);
    upstream.pipe(client);
  });
  servers.add(server);
  server.once('error', (error) => process.send({ type: 'failed', id: m.id, message: error.message }));
  server.listen(m.port ?? 0, m.host, () => process.send({ type: 'listening', id: m.id, port: server.address().port }));
});

// The test process is gone or done with us: stop at once.
process.on('disconnect', () => {
  for (const s of sockets) s.destroy();
  for (const s of servers) s.close();
  process.exit(0);
});
