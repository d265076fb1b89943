import type { User } from '../../server/core/models';
import { createPairset, getPairsetDetail, startBuild } from '../../server/core/pairsets/pairsets';
import { pairsetDefinitionSchema, type PairsetDefinition } from '../../shared/schemas/pairsets';
import type { PairsetDetail } from '../../shared/types/pairsets';
import type { TestRuntime } from './pipeline-runtime';

let serial = 0;

/** A definition as the API would store it, from a few fields (the rest take the form's usual choices). */
export function pairsetDefinition(fields: Partial<PairsetDefinition> & Pick<PairsetDefinition, 'projectIds'>) {
  serial += 1;
  return pairsetDefinitionSchema.parse({
    name: `pairs ${serial}`,
    views: ['frame', 'neighbour'],
    deltas: [1],
    graph: 'core',
    split: { val: 0.3, seed: 1 },
    ...fields,
  });
}

/** Defines, builds with the real job runtime, and returns the pairset as the API shows it. */
export async function buildPairsetNow(
  runtime: TestRuntime,
  owner: User,
  fields: Partial<PairsetDefinition> & Pick<PairsetDefinition, 'projectIds'>,
): Promise<PairsetDetail> {
  const created = await createPairset(pairsetDefinition(fields), owner.id);
  await startBuild(created.id, owner);
  await runtime.drain();
  return getPairsetDetail(created.id);
}
