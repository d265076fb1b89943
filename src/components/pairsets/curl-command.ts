import type { ShardSummary } from '../../../shared/types/pairsets';

/**
 * A shell script that downloads a built pairset with an API token and verifies every shard: pairset.json first,
 * then each shard with `curl -C -` (a second run resumes a broken download through HTTP Range), then
 * `sha256sum -c` against the checksums of pairset.json. The token is read from KINEFOLD_TOKEN, never written here.
 */
export function curlCommand(origin: string, pairsetId: number, shards: readonly ShardSummary[]): string {
  const base = `${origin}/api/pairsets/${pairsetId}`;
  const auth = '-H "Authorization: Bearer $KINEFOLD_TOKEN"';
  return [
    '# KINEFOLD_TOKEN holds an API token (create one on the API tokens page).',
    `mkdir -p pairset-${pairsetId} && cd pairset-${pairsetId}`,
    `curl -fL ${auth} -o pairset.json "${base}/manifest"`,
    ...shards.map((shard) => `curl -fL -C - ${auth} -o ${shard.file} "${base}/shards/${shard.index}"`),
    "sha256sum -c <<'SUMS'",
    ...shards.map((shard) => `${shard.sha256}  ${shard.file}`),
    'SUMS',
  ].join('\n');
}
