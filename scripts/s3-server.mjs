/**
 * Local S3 endpoint for development and tests (s3rver, path-style on 127.0.0.1). Creates the
 * application bucket with a CORS rule so that browsers can PUT to presigned URLs.
 * Usage: node scripts/s3-server.mjs --dir DIR --port PORT --bucket NAME
 */
import { parseArgs } from 'node:util';
import S3rver from 's3rver';

const { values } = parseArgs({
  options: { dir: { type: 'string' }, port: { type: 'string' }, bucket: { type: 'string', default: 'varigate' } },
});
if (!values.dir || !values.port) {
  console.error('usage: node scripts/s3-server.mjs --dir DIR --port PORT [--bucket NAME]');
  process.exit(3);
}

// Browsers upload straight to presigned URLs and read the ETag back, so the bucket must allow
// cross-origin PUT and expose ETag.
const cors = `<CORSConfiguration>
  <CORSRule>
    <AllowedOrigin>*</AllowedOrigin>
    <AllowedMethod>GET</AllowedMethod>
    <AllowedMethod>PUT</AllowedMethod>
    <AllowedMethod>HEAD</AllowedMethod>
    <AllowedHeader>*</AllowedHeader>
    <ExposeHeader>ETag</ExposeHeader>
    <MaxAgeSeconds>3000</MaxAgeSeconds>
  </CORSRule>
</CORSConfiguration>`;

const server = new S3rver({
  address: '127.0.0.1',
  port: Number(values.port),
  directory: values.dir,
  silent: true,
  vhostBuckets: false,
  configureBuckets: [{ name: values.bucket, configs: [Buffer.from(cors)] }],
});

await server.run();
console.log(`s3 listening on http://127.0.0.1:${values.port} (bucket ${values.bucket}, data in ${values.dir})`);

const stop = async () => {
  await server.close();
  process.exit(0);
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
