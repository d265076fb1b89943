/**
 * A shell script that downloads a built pairset with an API token and verifies every shard. It fetches
 * pairset.json and loops over its shards (python3 reads the JSON, as the Python reader does): a shard already
 * complete is skipped without a request, a partial one continues with `curl -C -` (HTTP Range), a missing one is
 * fetched; then `sha256sum -c` checks each against pairset.json. The same few lines serve any number of shards,
 * and a second run after a break resumes quietly. The token is read from KINEFOLD_TOKEN, never written here.
 */
export function curlCommand(origin: string, pairsetId: number): string {
  const listShards =
    'python3 -c \'import json; [print(s["index"], s["bytes"], s["sha256"], s["file"]) ' +
    'for s in json.load(open("pairset.json"))["shards"]]\'';
  return [
    '# KINEFOLD_TOKEN holds an API token (create one on the API tokens page). Run again to resume.',
    `base="${origin}/api/pairsets/${pairsetId}"`,
    `mkdir -p pairset-${pairsetId} && cd pairset-${pairsetId}`,
    'curl -fsSL -H "Authorization: Bearer $KINEFOLD_TOKEN" -o pairset.json "$base/manifest"',
    `${listShards} | while read -r index bytes sum file; do`,
    '  have=0; [ -f "$file" ] && have=$(( $(wc -c < "$file") ))',
    '  [ "$have" -eq "$bytes" ] && continue',
    '  [ "$have" -gt "$bytes" ] && rm -f -- "$file"',
    '  curl -fL -C - -H "Authorization: Bearer $KINEFOLD_TOKEN" -o "$file" "$base/shards/$index"',
    'done',
    `${listShards} | awk '{ print $3 "  " $4 }' | sha256sum -c -`,
  ].join('\n');
}
