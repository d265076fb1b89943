import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { useReviewStore, type GivenVerdict } from '../../src/stores/review';

function jsonResponse(status: number, body: unknown): Response {
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
}

/** What the verdict route answers for a clip: the clip with its verdict in force. */
const decidedClip = (clipId: number, verdictId: number) => ({
  id: clipId,
  originalName: `clip-${clipId}.mp4`,
  verdict: { id: verdictId, decision: 'accept', reason: null, reasonLabel: null },
});

const accept = (clipId: number): GivenVerdict => ({
  clipId,
  clipName: `clip-${clipId}.mp4`,
  words: 'Accept',
  body: { decision: 'accept' },
});

/** Requests as "METHOD path", in the order sent; `answer` decides each one's response. */
function stubApi(answer: (method: string, path: string) => Promise<Response> | Response) {
  const sent: string[] = [];
  vi.stubGlobal(
    'fetch',
    vi.fn(async (url: string, init?: RequestInit) => {
      const path = String(url);
      if (path === '/api/auth/csrf') return jsonResponse(200, { token: 'csrf' });
      const method = init?.method ?? 'GET';
      sent.push(`${method} ${path}`);
      return answer(method, path);
    }),
  );
  return sent;
}

describe('the review store: verdicts sent behind the screen', () => {
  beforeEach(() => setActivePinia(createPinia()));
  afterEach(() => vi.unstubAllGlobals());

  it('sends a verdict once the claim is held, then offers it for undo', async () => {
    const sent = stubApi(() => jsonResponse(200, decidedClip(7, 70)));
    const review = useReviewStore();
    let holdClaim!: () => void;
    review.give(accept(7), new Promise<void>((resolve) => (holdClaim = resolve)));
    expect(review.sending.map((entry) => entry.clipId)).toEqual([7]);
    expect(review.offerable(7)).toBe(false);
    await Promise.resolve();
    expect(sent).toEqual([]);
    holdClaim();
    await review.settled();
    expect(sent).toEqual(['POST /api/clips/7/verdict']);
    expect(review.sending).toEqual([]);
    expect(review.undoable).toMatchObject({ clipId: 7, verdictId: 70, words: 'Accepted' });
    expect(review.refused).toEqual([]);
  });

  it('asks before the tab closes while a verdict is still to be sent, and not after', async () => {
    stubApi(() => jsonResponse(200, decidedClip(8, 80)));
    const review = useReviewStore();
    const leaving = () => {
      const event = new Event('beforeunload', { cancelable: true });
      window.dispatchEvent(event);
      return event.defaultPrevented;
    };
    let holdClaim!: () => void;
    review.give(accept(8), new Promise<void>((resolve) => (holdClaim = resolve)));
    expect(leaving()).toBe(true);
    holdClaim();
    await review.settled();
    expect(leaving()).toBe(false);
  });

  it('sends verdicts one after the other, so the one to undo is the last given', async () => {
    let answerFirst!: () => void;
    const firstAnswered = new Promise<void>((resolve) => (answerFirst = resolve));
    const sent = stubApi(async (_method, path) => {
      if (path === '/api/clips/1/verdict') await firstAnswered;
      const clipId = Number(path.split('/')[3]);
      return jsonResponse(200, decidedClip(clipId, clipId * 10));
    });
    const review = useReviewStore();
    review.give(accept(1), Promise.resolve());
    review.give(accept(2), Promise.resolve());
    await new Promise((resolve) => setTimeout(resolve, 10));
    expect(sent).toEqual(['POST /api/clips/1/verdict']);
    answerFirst();
    await review.settled();
    expect(sent).toEqual(['POST /api/clips/1/verdict', 'POST /api/clips/2/verdict']);
    expect(review.undoable?.clipId).toBe(2);
  });

  it('lists a verdict the server refuses with its reason and puts the clip back', async () => {
    const sent = stubApi((method) =>
      method === 'POST'
        ? jsonResponse(409, { error: { code: 'not_reviewable', message: 'Clip 9 is processing.' } })
        : new Response(null, { status: 204 }),
    );
    const review = useReviewStore();
    review.pass(9);
    review.give(accept(9), Promise.resolve());
    await review.settled();
    expect(review.refused).toEqual([{ ...accept(9), message: 'Clip 9 is processing.' }]);
    expect(review.undoable).toBeNull();
    // Back in the walk, and the claim let go so the queue shows it free.
    expect(review.offerable(9)).toBe(true);
    expect(sent).toEqual(['POST /api/clips/9/verdict', 'DELETE /api/clips/9/claim']);
    review.dismissRefusal(9);
    expect(review.refused).toEqual([]);
  });

  it('refuses a verdict without sending it when the claim could not be taken', async () => {
    const sent = stubApi(() => new Response(null, { status: 204 }));
    const review = useReviewStore();
    review.give(accept(4), Promise.reject(new Error('Clip 4 is claimed by Oda Lindqvist.')));
    await review.settled();
    expect(review.refused.map((entry) => entry.message)).toEqual(['Clip 4 is claimed by Oda Lindqvist.']);
    expect(sent.filter((request) => request.startsWith('POST'))).toEqual([]);
  });

  it('uses a lookup and a clip fetched ahead once, then asks again', async () => {
    stubApi(() => jsonResponse(200, {}));
    const review = useReviewStore();
    const lookup = vi.fn(async (id: number) => id + 1);
    await review.lookAhead(5, 'flow', lookup);
    expect(await review.nextAfter(5, 'flow', lookup)).toBe(6);
    expect(lookup).toHaveBeenCalledTimes(1);
    // Under another filter and order the lookup made ahead does not count.
    await review.lookAhead(5, 'flow', lookup);
    expect(await review.nextAfter(5, 'other flow', lookup)).toBe(6);
    expect(lookup).toHaveBeenCalledTimes(3);
    await review.nextAfter(5, 'flow', lookup);
    expect(lookup).toHaveBeenCalledTimes(3);
    await review.nextAfter(5, 'flow', lookup);
    expect(lookup).toHaveBeenCalledTimes(4);
  });
});
