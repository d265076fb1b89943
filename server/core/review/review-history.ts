import type { ClipVerdict } from '../../../shared/types/review';
import { User, Verdict } from '../models';

/** Every verdict on a clip, oldest first, changed ones included, with the curator's name. */
export async function verdictHistory(clipId: number): Promise<ClipVerdict[]> {
  const verdicts = await Verdict.findAll({
    where: { clipId },
    include: [{ model: User, as: 'curator', attributes: ['id', 'name'] }],
    order: [
      ['at', 'ASC'],
      ['id', 'ASC'],
    ],
  });
  return verdicts.map((verdict) => verdict.toApi());
}
