import type request from 'supertest';

/** A supertest parser that keeps an answer's body as bytes, whatever its content type (shards, frames, files). */
export function binary(res: request.Response, done: (error: Error | null, body: Buffer) => void): void {
  const chunks: Buffer[] = [];
  res.on('data', (chunk: Buffer) => chunks.push(chunk));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}
