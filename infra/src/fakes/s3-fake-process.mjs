// The S3 fake's own process: s3rver writes objects with the process umask and has no mode
// option, so a separate process with umask 077 keeps every file it writes owner-only (0600,
// folders 0700) without changing the umask of whoever started it. Plain ESM: runs under bare node.
import S3rver from 's3rver';

process.umask(0o077);
const { port, directory, bucket } = JSON.parse(process.argv[2]);
const server = new S3rver({ port, address: '127.0.0.1', directory, silent: true, configureBuckets: [{ name: bucket }] });
const { address, port: listening } = await server.run();
process.send({ address, port: listening });

const stop = async () => {
  await server.close().catch(() => {});
  process.exit(0);
};
process.on('message', (message) => {
  if (message === 'close') void stop();
});
// The parent went away without closing us: do not linger holding the port.
process.on('disconnect', () => void stop());
