import fs from 'node:fs';
import { STORED_VIEWS } from '../../shared/pipeline-stages';
import { forEachFrame } from './each-frame';
import type { PipelineStage } from './stage';

/**
 * views: the luma (L*) and chroma (a*, b*) of every frame from sRGB → CIE L*a*b* (shared/colour/srgb-lab.ts),
 * written as DESIGN §7 says (shared/colour/view-encoding.ts) into views/luma and views/chroma.
 */
export const viewsStage: PipelineStage = {
  name: 'views',
  async run(context) {
    const { clip, pool, paths } = context;
    const layout = paths.clipDerived(clip.id);
    const work = await context.workDir();
    for (const view of STORED_VIEWS) await fs.promises.mkdir(work.layout.viewDir(view), { recursive: true });
    await forEachFrame(clip.frameCount ?? 0, context, (index, signal) =>
      pool.writeFrameViews(
        {
          frameFile: layout.frame(index),
          lumaFile: work.layout.view('luma', index),
          chromaFile: work.layout.view('chroma', index),
        },
        signal,
      ),
    );
    await work.moveIntoPlace(layout, ['viewsDir']);
    await context.commit();
  },
};
