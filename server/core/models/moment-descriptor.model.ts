import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import { APPEARANCE_DIMS, MOTION_DIMS, momentDescriptor } from '../../../shared/diversity/descriptor-layout';

/**
 * The moment descriptors of one clip (shared/diversity/descriptor-layout.ts): Float32 little-endian, frame by
 * frame. The signals stage writes appearance (and clears motion); the motion stage writes motion.
 */
export class MomentDescriptor extends Model<
  InferAttributes<MomentDescriptor>,
  InferCreationAttributes<MomentDescriptor>
> {
  declare clipId: number;
  declare frameCount: number;
  declare appearance: Buffer;
  declare motion: Buffer | null;

  /** Frame t's full descriptor written into `out` (motion zeros before the motion stage or where no field is). */
  momentInto(t: number, out: Float64Array): Float64Array {
    const appearance = floats(this.appearance).subarray(t * APPEARANCE_DIMS, (t + 1) * APPEARANCE_DIMS);
    const motion = this.motion ? floats(this.motion).subarray(t * MOTION_DIMS, (t + 1) * MOTION_DIMS) : null;
    return momentDescriptor(appearance, motion, out);
  }

  static initModel(sequelize: Sequelize): void {
    MomentDescriptor.init(
      {
        clipId: { type: DataTypes.INTEGER, primaryKey: true },
        frameCount: { type: DataTypes.INTEGER, allowNull: false },
        appearance: { type: DataTypes.BLOB, allowNull: false },
        motion: { type: DataTypes.BLOB, allowNull: true },
      },
      { sequelize, tableName: 'moment_descriptors', timestamps: false },
    );
  }
}

/** Float32 vectors, one after another, as the blob a descriptor part is stored in. */
export function floatBlob(vectors: readonly Float32Array[]): Buffer {
  const out = new Float32Array(vectors.reduce((sum, vector) => sum + vector.length, 0));
  let offset = 0;
  for (const vector of vectors) {
    out.set(vector, offset);
    offset += vector.length;
  }
  return Buffer.from(out.buffer, out.byteOffset, out.byteLength);
}

/** A stored blob as floats (copied: a Buffer from the driver need not be 4-byte aligned). */
function floats(blob: Buffer): Float32Array {
  const copy = new Uint8Array(blob.byteLength);
  copy.set(blob);
  return new Float32Array(copy.buffer);
}
