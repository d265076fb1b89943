import { MomentDescriptor } from '../../server/core/models';
import { floatBlob } from '../../server/core/models/moment-descriptor.model';
import { storagePaths } from '../../server/core/storage/paths';
import { decodePackedField } from '../../server/core/media/packed-field';
import { measureFrame } from '../../worker/pool/frame-tasks';
import { motionDescriptor } from '../../worker/signals/moment-descriptor';
import { MOTION_DIMS } from '../../shared/diversity/descriptor-layout';
import fs from 'node:fs';
import type { TestServer } from './test-server';

/**
 * The moment descriptors the signals and motion stages would store for a clip made by addPairsetClip: appearance
 * from the pipeline's own measure task on each frame PNG, motion from each stored forward field.
 */
export async function addMomentDescriptors(server: TestServer, clipId: number, frames: number): Promise<void> {
  const layout = storagePaths(server.storageDir).clipDerived(clipId);
  const appearance: Float32Array[] = [];
  const motion: Float32Array[] = [];
  for (let index = 0; index < frames; index += 1) {
    appearance.push(
      (await measureFrame({ kind: 'measure', frameFile: layout.frame(index), cutBins: 64, cutThumb: false }))
        .appearance,
    );
    const field = layout.motionField(index);
    motion.push(
      fs.existsSync(field)
        ? motionDescriptor(decodePackedField(fs.readFileSync(field)).flow)
        : new Float32Array(MOTION_DIMS),
    );
  }
  await MomentDescriptor.upsert({
    clipId,
    frameCount: frames,
    appearance: floatBlob(appearance),
    motion: floatBlob(motion),
  });
}
