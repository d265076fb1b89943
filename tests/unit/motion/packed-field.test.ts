import { describe, expect, it } from 'vitest';
import { decodePackedField, encodePackedField } from '../../../server/core/media/packed-field';
import { decodeFlo, encodeFlo, floByteLength } from '../../../shared/motion/formats/flo';
import { decodeKittiComponent, encodeKittiComponent } from '../../../shared/motion/formats/kitti-png';
import { UNKNOWN_FLOW, isUnknownFlow } from '../../../shared/motion/unknown-flow';
import { GROVE3_FETCH_COMMAND, grove3Available, loadGrove3 } from '../../helpers/grove3';

/** Largest error a component may have in the packed form: half the 1/64 px step of the KITTI 2015 encoding. */
const BOUND_PX = 1 / 128;

function maxComponentError(a: Float32Array, b: Float32Array): number {
  let worst = 0;
  for (let i = 0; i < a.length; i++) {
    if (isUnknownFlow(a[i - (i % 2)]!, a[i - (i % 2) + 1]!)) continue;
    worst = Math.max(worst, Math.abs(a[i]! - b[i]!));
  }
  return worst;
}

/** A smooth swirl with a band of unknown pixels, as an estimator's field with occlusions might look. */
function swirl(width: number, height: number): Float32Array {
  const flow = new Float32Array(2 * width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const p = y * width + x;
      const unknown = x === 3 || (y === 5 && x > 10);
      flow[2 * p] = unknown ? UNKNOWN_FLOW : 7.3 * Math.sin(y / 9) + x / 37;
      flow[2 * p + 1] = unknown ? UNKNOWN_FLOW : -4.1 * Math.cos(x / 11) - y / 53;
    }
  }
  return flow;
}

describe('packed motion fields', () => {
  it('keeps every component within 1/128 px and every unknown pixel unknown', () => {
    const [width, height] = [41, 23];
    const flow = swirl(width, height);
    const back = decodePackedField(encodePackedField({ width, height, flow, consistent: null }));
    expect([back.width, back.height, back.consistent]).toEqual([width, height, null]);
    expect(maxComponentError(flow, back.flow)).toBeLessThanOrEqual(BOUND_PX);
    for (let p = 0; p < width * height; p++) {
      expect(isUnknownFlow(back.flow[2 * p]!, back.flow[2 * p + 1]!)).toBe(
        isUnknownFlow(flow[2 * p]!, flow[2 * p + 1]!),
      );
    }
  });

  it('rounds to the same 1/64 px steps as the KITTI 2015 flow encoding', () => {
    // KITTI 2015 devkit readme: u = (code − 2^15) / 64; a packed component decodes to the value a KITTI PNG holds.
    const values = Float32Array.from([0, 0.0078125, -0.0078125, 0.3, -12.71, 100.015625, -511.98]);
    const flow = new Float32Array(2 * values.length);
    values.forEach((value, i) => {
      flow[2 * i] = value;
      flow[2 * i + 1] = -value;
    });
    const back = decodePackedField(encodePackedField({ width: values.length, height: 1, flow, consistent: null }));
    values.forEach((value, i) => {
      expect(back.flow[2 * i]).toBe(decodeKittiComponent(encodeKittiComponent(value)));
      expect(back.flow[2 * i + 1]).toBe(decodeKittiComponent(encodeKittiComponent(-value)));
    });
  });

  it('stores a field beyond what 16 bits hold at 1/64 px as float32, unchanged', () => {
    const flow = Float32Array.from([600.123, -3.5, 0.25, UNKNOWN_FLOW, 1e-3, -700.5]);
    const back = decodePackedField(encodePackedField({ width: 3, height: 1, flow, consistent: null }));
    // A pixel with one unknown component is unknown (Middlebury flowIO.h), and comes back unknown in both.
    expect(back.flow).toEqual(Float32Array.from([600.123, -3.5, UNKNOWN_FLOW, UNKNOWN_FLOW, 1e-3, -700.5]));
  });

  it('keeps the consistency plane bit for bit', () => {
    const [width, height] = [13, 7];
    const consistent = Uint8Array.from({ length: width * height }, (_, p) => ((p * 7919) % 3 === 0 ? 1 : 0));
    const back = decodePackedField(encodePackedField({ width, height, flow: swirl(width, height), consistent }));
    expect(back.consistent).toEqual(consistent);
  });

  it('refuses what is not a packed field, or is cut short', () => {
    const bytes = encodePackedField({ width: 4, height: 3, flow: swirl(4, 3), consistent: null });
    expect(() => decodePackedField(encodeFlo(new Float32Array(24), 4, 3))).toThrow(/KFPF/);
    expect(() => decodePackedField(bytes.subarray(0, bytes.length - 4))).toThrow();
  });

  describe('on the Middlebury Grove3 ground truth', () => {
    // Open data: Middlebury "Grove3" ground-truth flow (Baker et al., IJCV 2011), 640×480, a real field with
    // motion up to about 20 px and fine structure.
    if (!grove3Available()) {
      it.skip(`skipped: Grove3 data missing, fetch it with: ${GROVE3_FETCH_COMMAND}`, () => {});
      return;
    }

    it('round-trips within 1/128 px at a fraction of the .flo size, and serves back a Middlebury .flo', async () => {
      const { width, height, truth } = await loadGrove3();
      const packed = encodePackedField({ width, height, flow: truth, consistent: null });
      const back = decodePackedField(packed);
      expect(maxComponentError(truth, back.flow)).toBeLessThanOrEqual(BOUND_PX);
      expect(packed.length).toBeLessThan(floByteLength(width, height) / 4);
      // What GET /api/clips/:id/motion/:i/flo answers: tag PIEH, 12 + 8·w·h bytes (CHECK-VALUES §1).
      const flo = encodeFlo(back.flow, width, height);
      expect(Buffer.from(flo.subarray(0, 4)).toString('latin1')).toBe('PIEH');
      expect(flo.length).toBe(floByteLength(width, height));
      expect(decodeFlo(flo).flow).toEqual(back.flow);
    });
  });
});
