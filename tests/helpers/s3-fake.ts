import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import S3rver from 's3rver';

export interface S3Fake {
  endpoint: string;
  bucket: string;
  /** The variables a Kinefold process needs to use the fake (s3rver accepts its own fixed credentials). */
  env: Record<string, string>;
  close(): Promise<void>;
}

/** s3rver, a local S3-compatible fake, on a free port over a temporary folder, with one empty bucket. */
export async function startS3Fake(bucket = 'kinefold-test'): Promise<S3Fake> {
  const directory = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-s3-'));
  const fake = new S3rver({
    address: '127.0.0.1',
    port: 0,
    directory,
    silent: true,
    configureBuckets: [{ name: bucket, configs: [] }],
  });
  const { port } = await fake.run();
  const endpoint = `http://127.0.0.1:${port}`;
  return {
    endpoint,
    bucket,
    env: {
      KINEFOLD_S3_ENDPOINT: endpoint,
      AWS_ACCESS_KEY_ID: 'S3RVER',
      AWS_SECRET_ACCESS_KEY: 'S3RVER',
      AWS_REGION: 'us-east-1',
    },
    async close() {
      await fake.close();
      fs.rmSync(directory, { recursive: true, force: true });
    },
  };
}
