// Latest-wins coalescing of slider drags (the behaviour ipywidgets uses for its own sync buffer:
// while a message is pending, newer updates replace older ones; common practice).
import { describe, expect, it } from 'vitest';
import { LatestWinsClient, type Outcome, type SplitPlan, type WorkerLike } from '../../widgets/src/compute-client.js';
import type { ViewRequest } from '../../contract/protocol.js';
import type { ComputeMessage, ComputeReply } from '../../widgets/src/worker-messages.js';

/** A worker whose replies the test releases by hand, to order events exactly. */
class HeldWorker implements WorkerLike {
  onmessage: ((event: MessageEvent<ComputeReply>) => void) | null = null;
  onerror: ((event: ErrorEvent) => void) | null = null;
  received: ComputeMessage[] = [];
  terminated = false;
  postMessage(message: ComputeMessage): void {
    this.received.push(message);
  }
  terminate(): void {
    this.terminated = true;
  }
  reply(reply: ComputeReply): void {
    this.onmessage?.({ data: reply } as MessageEvent<ComputeReply>);
  }
  fail(message: string): void {
    this.onerror?.({ message } as ErrorEvent);
  }
}

/** A client whose workers (made on demand) the test holds, and the outcomes it delivered. */
function heldClient(plan?: SplitPlan): { client: LatestWinsClient; workers: HeldWorker[]; outcomes: Outcome[] } {
  const workers: HeldWorker[] = [];
  const outcomes: Outcome[] = [];
  const spawn = () => {
    const w = new HeldWorker();
    workers.push(w);
    return w;
  };
  return { client: new LatestWinsClient(spawn, (o) => outcomes.push(o), plan), workers, outcomes };
}

function request(u: number): ViewRequest {
  return { kind: 'curvature', model: { format: 'chernel.model', name: 'm', periodic: 2, vectors: [], orbitals: [], parameters: {} }, params: { u } };
}

function ok(id: number, u: number): ComputeReply {
  return { id, ok: true, ms: 1, result: { kind: 'curvature', checks: { minGap: u, warnings: [] } } };
}

describe('LatestWinsClient', () => {
  it('sends the first request at once, keeps only the newest while busy, and drops the rest', () => {
    const { client, workers, outcomes } = heldClient();
    for (const u of [1, 2, 3, 4, 5]) client.submit(request(u));
    expect(workers).toHaveLength(1);
    const worker = workers[0];
    expect(worker.received.map((m) => m.request.params.u)).toEqual([1]);
    expect(client.dropped).toBe(3);
    worker.reply(ok(worker.received[0].id, 1));
    // The in-flight result is delivered (the plot follows), then the newest request goes out.
    expect(outcomes.map((o) => o.request.params.u)).toEqual([1]);
    expect(worker.received.map((m) => m.request.params.u)).toEqual([1, 5]);
    worker.reply(ok(worker.received[1].id, 5));
    expect(outcomes.map((o) => o.result?.checks.minGap)).toEqual([1, 5]);
    expect(client.busy).toBe(false);
  });

  it('sends the waiting request before delivering the reply, so computing overlaps drawing', () => {
    const worker = new HeldWorker();
    const sentAtDelivery: number[] = [];
    const client = new LatestWinsClient(() => worker, () => sentAtDelivery.push(worker.received.length));
    client.submit(request(1));
    client.submit(request(2));
    worker.reply(ok(worker.received[0].id, 1));
    expect(sentAtDelivery).toEqual([2]);
  });

  it('ignores a reply that is not for the request in flight', () => {
    const worker = new HeldWorker();
    const outcomes: Outcome[] = [];
    const client = new LatestWinsClient(() => worker, (o) => outcomes.push(o));
    client.submit(request(1));
    worker.reply(ok(999, 1));
    expect(outcomes).toHaveLength(0);
    expect(client.busy).toBe(true);
  });

  it('delivers an engine error and keeps working for the next value', () => {
    const worker = new HeldWorker();
    const outcomes: Outcome[] = [];
    const client = new LatestWinsClient(() => worker, (o) => outcomes.push(o));
    client.submit(request(-9));
    worker.reply({ id: worker.received[0].id, ok: false, error: { name: 'ModelError', message: 'params.u: outside its range' } });
    client.submit(request(1));
    worker.reply(ok(worker.received[1].id, 1));
    expect(outcomes[0].error).toEqual({ name: 'ModelError', message: 'params.u: outside its range' });
    expect(outcomes[1].result?.checks.minGap).toBe(1);
  });

  it('replaces a crashed worker on the next request and reports the crash', () => {
    const { client, workers, outcomes } = heldClient();
    client.submit(request(1));
    client.submit(request(2));
    workers[0].fail('out of memory');
    expect(workers[0].terminated).toBe(true);
    expect(outcomes[0].error).toEqual({ name: 'WorkerError', message: 'out of memory' });
    // The waiting request went to a fresh worker.
    expect(workers).toHaveLength(2);
    expect(workers[1].received.map((m) => m.request.params.u)).toEqual([2]);
  });

  it('dispose terminates the worker and forgets pending work', () => {
    const worker = new HeldWorker();
    const client = new LatestWinsClient(() => worker, () => undefined);
    client.submit(request(1));
    client.submit(request(2));
    client.dispose();
    expect(worker.terminated).toBe(true);
    expect(client.busy).toBe(false);
  });

  it('splits a request into one part per worker, computed side by side, joined once all are in', () => {
    const joined: unknown[][] = [];
    // A plan of our own: three parts, each tagged; the join records what it was given.
    const plan: SplitPlan = {
      parts: () => 3,
      partRequest: (r, index, count) => ({ ...r, part: { index, count } }),
      join: (r, parts) => {
        joined.push(parts.map((p) => p.checks.minGap));
        return { kind: 'curvature', checks: { minGap: Math.min(...parts.map((p) => p.checks.minGap ?? Infinity)), warnings: [] } };
      },
    };
    const { client, workers, outcomes } = heldClient(plan);
    client.submit(request(1));
    expect(workers).toHaveLength(3);
    expect(workers.map((w) => w.received[0].request.part)).toEqual([0, 1, 2].map((index) => ({ index, count: 3 })));
    // Replies arrive in any order; nothing is delivered until the last part is in.
    workers[2].reply({ ...ok(workers[2].received[0].id, 0.3), ms: 7 });
    workers[0].reply({ ...ok(workers[0].received[0].id, 0.1), ms: 5 });
    expect(outcomes).toHaveLength(0);
    workers[1].reply({ ...ok(workers[1].received[0].id, 0.2), ms: 6 });
    expect(joined).toEqual([[0.1, 0.2, 0.3]]);
    expect(outcomes[0].result?.checks.minGap).toBe(0.1);
    expect(outcomes[0].computeMs).toBeGreaterThanOrEqual(7);
    // The next request reuses the same three workers.
    client.submit(request(2));
    expect(workers).toHaveLength(3);
  });

  it('a failed part fails the whole request, with the engine error', () => {
    const plan: SplitPlan = { parts: () => 2, partRequest: (r) => r, join: () => { throw new Error('not reached'); } };
    const { client, workers, outcomes } = heldClient(plan);
    client.submit(request(1));
    workers[0].reply(ok(workers[0].received[0].id, 1));
    workers[1].reply({ id: workers[1].received[0].id, ok: false, error: { name: 'ModelError', message: 'part: bad' } });
    expect(outcomes[0].error).toEqual({ name: 'ModelError', message: 'part: bad' });
    expect(client.busy).toBe(false);
  });

  it('a warm-up computes without delivering; a request made meanwhile goes out after it', () => {
    const { client, workers, outcomes } = heldClient();
    client.warm(request(0));
    expect(workers[0].received.map((m) => m.request.params.u)).toEqual([0]);
    client.submit(request(1));
    expect(client.busy).toBe(true);
    workers[0].reply(ok(workers[0].received[0].id, 0));
    expect(outcomes).toHaveLength(0);
    expect(workers[0].received.map((m) => m.request.params.u)).toEqual([0, 1]);
    workers[0].reply(ok(workers[0].received[1].id, 1));
    expect(outcomes.map((o) => o.result?.checks.minGap)).toEqual([1]);
    // Nothing is warmed while work is pending.
    client.submit(request(2));
    client.warm(request(3));
    expect(workers[0].received.map((m) => m.request.params.u)).toEqual([0, 1, 2]);
  });
});
