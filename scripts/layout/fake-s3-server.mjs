// The fake S3 store's own process (started by fake-s3.ts): s3rver on loopback with one bucket.
// Run under `node --openssl-legacy-provider`: s3rver makes ListObjectsV2 continuation tokens with
// DES, which OpenSSL 3 leaves to its legacy provider, so listings past 1,000 keys need it.
// Prints one JSON line {"port": N} once it listens; stops on SIGTERM or SIGINT.
import S3rver from "s3rver";

const server = new S3rver({
  address: "127.0.0.1",
  port: Number(process.env.FAKE_S3_PORT ?? 0),
  silent: true,
  directory: process.env.FAKE_S3_DIR,
  configureBuckets: [{ name: process.env.FAKE_S3_BUCKET }],
});
const { port } = await server.run();
process.stdout.write(`${JSON.stringify({ port })}\n`);
const stop = () => server.close().then(() => process.exit(0), () => process.exit(1));
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
