import { createHash, randomBytes } from 'node:crypto';
import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { deleteObject, getObjectStream, headObject, putObject } from '@/src/server/storage';

async function sha256OfStream(stream: Readable): Promise<{ hash: string; bytes: number }> {
  const h = createHash('sha256');
  let bytes = 0;
  for await (const chunk of stream) {
    h.update(chunk as Buffer);
    bytes += (chunk as Buffer).length;
  }
  return { hash: h.digest('hex'), bytes };
}

describe('object storage through @aws-sdk/client-s3', () => {
  it('reads back a streamed 12 MB object byte-identical (no chunk framing stored)', async () => {
    const size = 12 * 1024 * 1024;
    const data = randomBytes(size);
    const expected = createHash('sha256').update(data).digest('hex');
    // Feed the SDK a real stream in 64 KiB pieces, as an upload handler does.
    const chunks: Buffer[] = [];
    for (let i = 0; i < size; i += 65536) chunks.push(data.subarray(i, i + 65536));
    const key = `test/streamed-${Date.now()}.bin`;
    await putObject({ key, body: Readable.from(chunks), contentLength: size });
    try {
      expect((await headObject(key))?.size).toBe(size);
      const back = await sha256OfStream(await getObjectStream(key));
      expect(back.bytes).toBe(size);
      expect(back.hash).toBe(expected);
    } finally {
      await deleteObject(key);
    }
  });

  it('reports a missing object as absent rather than throwing', async () => {
    await expect(headObject(`test/missing-${Date.now()}`)).resolves.toBeUndefined();
  });
});
