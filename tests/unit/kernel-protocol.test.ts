// The kernel's message handlers (kernel/protocol/kernel.ts) driven in memory: the real Kernel class
// between a transport that hands parsed messages over (no sockets; signing is the transport's job
// and is tested through Debian's jupyter_client in tests/kernel/) and a small real executor whose
// cells are mathjs statements. Each check names its source; "spec" is the Jupyter messaging
// specification, https://jupyter-client.readthedocs.io/en/latest/messaging.html (read from
// jupyter/jupyter_client docs/messaging.rst), with the section in brackets.
import { evaluate, format } from 'mathjs';
import { describe, expect, it } from 'vitest';
import type { CellError, CellExecutor, CommEvent, ExecuteOutcome, ExecutorEvents } from '../../kernel/protocol/executor.js';
import { Kernel } from '../../kernel/protocol/kernel.js';
import { PROTOCOL_VERSION, type Channel, type Dict, type Message, type Outgoing, type Transport } from '../../kernel/protocol/messages.js';

/** A transport without sockets: the test delivers parsed messages and reads what the kernel sent. */
class MemoryTransport implements Transport {
  private receive: ((channel: Channel, message: Message) => void) | null = null;
  readonly sent: { channel: Channel; message: Outgoing }[] = [];
  closed = false;

  onMessage(handler: (channel: Channel, message: Message) => void): void {
    this.receive = handler;
  }

  send(channel: Channel, message: Outgoing): void {
    this.sent.push({ channel, message });
  }

  close(): Promise<void> {
    this.closed = true;
    return Promise.resolve();
  }

  deliver(channel: Channel, message: Message): void {
    if (!this.receive) throw new Error('MemoryTransport: the kernel has not subscribed');
    this.receive(channel, message);
  }
}

/**
 * Cells are mathjs statements sharing one scope. `say(x)` prints a line, `show(x)` displays x,
 * `wait()` keeps the cell running until it is interrupted, `ask(prompt)` reads a line from the
 * front end. A comm message from the front end is echoed back on the same comm.
 */
class MathCells implements CellExecutor {
  private readonly scope = new Map<string, unknown>();
  private readonly open = new Map<string, string>();
  private running: ((error: CellError) => void) | null = null;
  readonly engineNames = ['sqrt', 'pi'];
  stopped = false;

  constructor(private readonly events: ExecutorEvents) {}

  async execute(source: string, options: { silent: boolean; label: string }): Promise<ExecuteOutcome> {
    if (this.running) throw new Error('execute: a cell is already running');
    const asked: { wait: boolean; prompt: string | null } = { wait: false, prompt: null };
    const cellScope = new Map(this.scope);
    cellScope.set('say', (x: unknown) => void (options.silent || this.events.stream('stdout', `${typeof x === 'string' ? x : format(x)}\n`)));
    cellScope.set('show', (x: unknown) => void this.events.display({ data: { 'text/plain': format(x) }, metadata: {} }, null, false));
    cellScope.set('wait', () => void (asked.wait = true));
    cellScope.set('ask', (prompt: string) => void (asked.prompt = prompt));
    let value: unknown;
    try {
      value = evaluate(source, cellScope) as unknown;
    } catch (error) {
      const e = error as Error;
      return { status: 'error', ename: e.name, evalue: e.message, traceback: [`${e.name}: ${e.message}`, `    at ${options.label}`] };
    }
    for (const [name, v] of cellScope) if (!['say', 'show', 'wait', 'ask'].includes(name)) this.scope.set(name, v);
    if (asked.wait) {
      return new Promise((resolve) => (this.running = (error) => resolve({ status: 'error', ...error })));
    }
    if (asked.prompt !== null) {
      try {
        value = await this.events.input(asked.prompt, false);
      } catch (error) {
        return { status: 'error', ename: 'InputError', evalue: (error as Error).message, traceback: [] };
      }
    }
    const last = value !== null && typeof value === 'object' && 'entries' in value ? (value.entries as unknown[]).at(-1) : value;
    return { status: 'ok', result: last === undefined ? null : { data: { 'text/plain': format(last) }, metadata: {} } };
  }

  interrupt(): boolean {
    const stop = this.running;
    this.running = null;
    stop?.({ ename: 'Interrupted', evalue: 'the cell was interrupted', traceback: ['Interrupted'] });
    return stop !== null;
  }

  async names(path: string[]): Promise<string[] | null> {
    if (this.running) return null;
    let value: unknown = path.length ? this.scope.get(path[0]) : Object.fromEntries(this.scope);
    for (const key of path.slice(1)) value = (value as Record<string, unknown> | undefined)?.[key];
    return value !== null && typeof value === 'object' ? Object.keys(value) : [];
  }

  async inspect(path: string[]): Promise<string | null> {
    const value = this.scope.get(path[0]);
    return value === undefined ? null : `${path[0]}: ${format(value)}`;
  }

  async comm(event: CommEvent): Promise<void> {
    if (event.type === 'comm_open') this.open.set(event.commId, event.targetName);
    if (event.type === 'comm_close') this.open.delete(event.commId);
    if (event.type === 'comm_msg') this.events.comm({ type: 'comm_msg', commId: event.commId, data: { echo: event.data }, metadata: {}, buffers: [] });
  }

  comms(): ReadonlyMap<string, string> {
    return this.open;
  }

  async shutdown(): Promise<void> {
    this.stopped = true;
  }
}

let serial = 0;

function request(msgType: string, content: Dict, session = 'client-a'): Message {
  return {
    identities: [Buffer.from(`peer-${session}`)],
    header: { msg_id: `${msgType}-${++serial}`, msg_type: msgType, session, username: 'tester', date: new Date().toISOString(), version: PROTOCOL_VERSION },
    parent_header: {},
    metadata: {},
    content,
    buffers: [],
  };
}

const pause = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

function setUp() {
  const transport = new MemoryTransport();
  const made: MathCells[] = [];
  const shutdowns: boolean[] = [];
  const kernel = new Kernel(transport, (events) => made[made.push(new MathCells(events)) - 1], (restart) => shutdowns.push(restart));
  /** Everything the kernel sent in answer to `message`, in order, once it went idle for it. */
  const answers = async (message: Message) => {
    const mine = () => transport.sent.filter((s) => s.message.parent_header.msg_id === message.header.msg_id);
    for (let i = 0; i < 500 && !mine().some((s) => s.message.header.msg_type === 'status' && s.message.content.execution_state === 'idle'); i++) await pause(2);
    return mine();
  };
  const send = (channel: Channel, message: Message) => {
    transport.deliver(channel, message);
    return answers(message);
  };
  const execute = async (code: string, content: Dict = {}) => {
    const asked = request('execute_request', { code, ...content });
    const sent = await send('shell', asked);
    return { asked, sent, reply: replyOf(sent), iopub: sent.filter((s) => s.channel === 'iopub').map((s) => s.message) };
  };
  return { transport, kernel, executor: made[0], shutdowns, send, answers, execute };
}

function replyOf(sent: { channel: Channel; message: Outgoing }[]): Outgoing {
  const replies = sent.filter((s) => s.channel !== 'iopub');
  expect(replies).toHaveLength(1);
  return replies[0].message;
}

const types = (messages: Outgoing[]) => messages.map((m) => (m.header.msg_type === 'status' ? `status:${m.content.execution_state}` : m.header.msg_type));

describe('kernel protocol handlers, in memory', () => {
  it('publishes status "starting" once, then answers kernel_info_request on the channel it came by (spec [Kernel status], [Kernel info])', async () => {
    const { transport, send } = setUp();
    expect(transport.sent.map((s) => [s.channel, s.message.content.execution_state])).toEqual([['iopub', 'starting']]);
    for (const channel of ['shell', 'control'] as const) {
      const asked = request('kernel_info_request', {});
      const sent = await send(channel, asked);
      const reply = replyOf(sent);
      expect(sent.find((s) => s.message === reply)?.channel).toBe(channel);
      expect(reply.header.msg_type).toBe('kernel_info_reply');
      expect(reply.parent_header).toEqual(asked.header);
      expect(reply.identities).toEqual(asked.identities);
      expect(reply.content).toMatchObject({ status: 'ok', protocol_version: PROTOCOL_VERSION, implementation: 'chernel' });
      expect(reply.content.language_info).toMatchObject({ name: 'typescript', file_extension: '.ts', mimetype: 'text/typescript' });
      expect(typeof reply.content.implementation_version).toBe('string');
      expect(typeof reply.content.banner).toBe('string');
      // [Request-Reply]: busy at once, the reply, then idle after everything else for the request.
      expect(sent.map((s) => (s.channel === 'iopub' ? `status:${s.message.content.execution_state}` : s.message.header.msg_type))).toEqual([
        'status:busy',
        'kernel_info_reply',
        'status:idle',
      ]);
    }
    expect(transport.sent.filter((s) => s.message.content.execution_state === 'starting')).toHaveLength(1);
  });

  it('execute_request: busy, execute_input, outputs, execute_result, the reply, idle; all with the request as parent (spec [Request-Reply], [Execute], [Code inputs], [Execution results])', async () => {
    const { execute } = setUp();
    const code = 'say("hello")\nshow(2)\n1 + 2';
    const { asked, sent, reply, iopub } = await execute(code);
    expect(sent.map((s) => (s.channel === 'iopub' ? types([s.message])[0] : `${s.channel}:${s.message.header.msg_type}`))).toEqual([
      'status:busy',
      'execute_input',
      'stream',
      'display_data',
      'execute_result',
      'shell:execute_reply',
      'status:idle',
    ]);
    for (const s of sent) expect(s.message.parent_header).toEqual(asked.header);
    expect(reply.identities).toEqual(asked.identities);
    expect(iopub[1].content).toEqual({ code, execution_count: 1 });
    expect(iopub[2].content).toEqual({ name: 'stdout', text: 'hello\n' });
    expect(iopub[3].content).toMatchObject({ data: { 'text/plain': '2' }, metadata: {} });
    expect(iopub[4].content).toEqual({ execution_count: 1, data: { 'text/plain': '3' }, metadata: {} });
    expect(reply.content).toEqual({ status: 'ok', execution_count: 1, user_expressions: {}, payload: [] });
    // One kernel session for every message it sends (spec [Message Header]: session identifies the sender).
    expect(new Set(sent.map((s) => s.message.header.session)).size).toBe(1);
  });

  it('execution_count counts requests that store history; silent and store_history=false ones do not (spec [Execution counter], [Execute])', async () => {
    const { execute } = setUp();
    expect((await execute('a = 5')).reply.content.execution_count).toBe(1);
    expect((await execute('a + 1')).reply.content.execution_count).toBe(2);
    const silent = await execute('say("hidden")\na * 2', { silent: true });
    // silent: no output broadcast on iopub and no execute_result; the reply carries the current counter.
    expect(types(silent.iopub)).toEqual(['status:busy', 'status:idle']);
    expect(silent.reply.content).toMatchObject({ status: 'ok', execution_count: 2 });
    const unstored = await execute('a * 3', { store_history: false });
    expect(unstored.reply.content.execution_count).toBe(2);
    expect(unstored.iopub.find((m) => m.header.msg_type === 'execute_result')?.content.data).toEqual({ 'text/plain': '15' });
    expect((await execute('a')).reply.content.execution_count).toBe(3);
  });

  it('a failing cell: an error message on iopub and an error reply with ename, evalue, traceback (spec [Request-Reply], [Execution errors])', async () => {
    const { execute } = setUp();
    const { reply, iopub } = await execute('1 + missing');
    const error = iopub.find((m) => m.header.msg_type === 'error');
    expect(error?.content).toEqual({ ename: 'Error', evalue: 'Undefined symbol missing', traceback: ['Error: Undefined symbol missing', '    at In [1]'] });
    expect(reply.content).toEqual({ status: 'error', execution_count: 1, ...error?.content });
    expect(types(iopub)).toEqual(['status:busy', 'execute_input', 'error', 'status:idle']);
  });

  it('user_expressions are evaluated after the cell, each error kept to its own key (spec [Execute])', async () => {
    const { execute } = setUp();
    const { reply } = await execute('b = 4', { user_expressions: { square: 'b ^ 2', wrong: 'nothing' } });
    expect(reply.content.user_expressions).toEqual({
      square: { status: 'ok', data: { 'text/plain': '16' }, metadata: {} },
      wrong: { status: 'error', ename: 'Error', evalue: 'Undefined symbol nothing', traceback: ['Error: Undefined symbol nothing', '    at user expression wrong'] },
    });
  });

  it('stop_on_error aborts the execute requests queued behind a failure, and only those of the same client (spec [Execute]; per-client: chernel\'s own rule)', async () => {
    const { transport, answers } = setUp();
    const failing = request('execute_request', { code: '1 + missing' });
    const queued = [request('execute_request', { code: '2 + 2' }), request('execute_request', { code: '3 + 3' })];
    const other = request('execute_request', { code: '4 + 4' }, 'client-b');
    for (const m of [failing, ...queued, other]) transport.deliver('shell', m);
    expect(replyOf(await answers(failing)).content.status).toBe('error');
    for (const m of queued) {
      const sent = await answers(m);
      expect(replyOf(sent).content).toEqual({ status: 'aborted', execution_count: 1 });
      expect(types(sent.map((s) => s.message))).toEqual(['status:busy', 'execute_reply', 'status:idle']);
    }
    const otherReply = replyOf(await answers(other));
    expect(otherReply.content).toMatchObject({ status: 'ok', execution_count: 2 });

    // Sent after the failure: runs. With stop_on_error false, the request behind a failure runs too.
    await pause(5);
    const lenient = request('execute_request', { code: '1 + missing', stop_on_error: false });
    const after = request('execute_request', { code: '5 + 5' });
    transport.deliver('shell', lenient);
    transport.deliver('shell', after);
    expect(replyOf(await answers(lenient)).content.status).toBe('error');
    expect(replyOf(await answers(after)).content).toMatchObject({ status: 'ok', execution_count: 4 });
  });

  it('complete_request: matches from scope, engine names and keywords; cursor positions in code points (spec [Completion])', async () => {
    const { execute, send } = setUp();
    await execute('alpha = 1\nalpine = 2\nbeta = 3\np = {x: 1, xy: 2, y: 3}');
    const bare = replyOf(await send('shell', request('complete_request', { code: 'c = al', cursor_pos: 6 }))).content;
    expect(bare).toEqual({ status: 'ok', matches: ['alpha', 'alpine'], cursor_start: 4, cursor_end: 6, metadata: {} });
    const member = replyOf(await send('shell', request('complete_request', { code: 'p.x', cursor_pos: 3 }))).content;
    expect(member).toMatchObject({ matches: ['x', 'xy'], cursor_start: 2, cursor_end: 3 });
    // '😀' is one code point but two UTF-16 units: positions count code points.
    const wide = replyOf(await send('shell', request('complete_request', { code: '😀; sq', cursor_pos: 5 }))).content;
    expect(wide).toMatchObject({ matches: ['sqrt'], cursor_start: 3, cursor_end: 5 });
    const keyword = replyOf(await send('shell', request('complete_request', { code: 'retu', cursor_pos: 4 }))).content;
    expect(keyword.matches).toEqual(['return']);
  });

  it('inspect_request: found with a text/plain bundle, or not found with empty data (spec [Introspection])', async () => {
    const { execute, send } = setUp();
    await execute('gamma = 7');
    const found = replyOf(await send('shell', request('inspect_request', { code: 'gamma + 1', cursor_pos: 2, detail_level: 0 }))).content;
    expect(found).toEqual({ status: 'ok', found: true, data: { 'text/plain': 'gamma: 7' }, metadata: {} });
    const missing = replyOf(await send('shell', request('inspect_request', { code: 'delta', cursor_pos: 5, detail_level: 0 }))).content;
    expect(missing).toEqual({ status: 'ok', found: false, data: {}, metadata: {} });
  });

  it('is_complete_request: complete, incomplete with an indent hint, invalid (spec [Code completeness])', async () => {
    const { send } = setUp();
    const status = async (code: string) => replyOf(await send('shell', request('is_complete_request', { code }))).content;
    expect(await status('const x = 1 + 1')).toEqual({ status: 'complete' });
    expect(await status('const x = (')).toEqual({ status: 'incomplete', indent: '  ' });
    expect(await status('const x = )')).toEqual({ status: 'invalid' });
  });

  it('history_request: (session, line, input) rows, or (session, line, (input, output)) with output (spec [History])', async () => {
    const { execute, send } = setUp();
    await execute('c = 1');
    await execute('c + 1');
    await execute('c + 9', { silent: true });
    const tail = replyOf(await send('shell', request('history_request', { hist_access_type: 'tail', n: 2, output: false, raw: true }))).content;
    expect(tail).toEqual({ status: 'ok', history: [[1, 1, 'c = 1'], [1, 2, 'c + 1']] });
    const withOutput = replyOf(await send('shell', request('history_request', { hist_access_type: 'range', session: 0, start: 2, stop: 3, output: true, raw: true }))).content;
    expect(withOutput.history).toEqual([[1, 2, ['c + 1', '2']]]);
    const search = replyOf(await send('shell', request('history_request', { hist_access_type: 'search', pattern: 'c =*', output: false, raw: true }))).content;
    expect(search.history).toEqual([[1, 1, 'c = 1']]);
  });

  it('interrupt_request on control is answered while a cell runs; the cell ends with an error and state is kept (spec [Kernel interrupt], from memory: interrupt_reply on control)', async () => {
    const { transport, execute, send, answers } = setUp();
    await execute('kept = 42');
    const running = request('execute_request', { code: 'wait()' });
    transport.deliver('shell', running);
    await pause(10);
    // Control does not queue behind the running cell (spec [Introduction]: control is a separate channel for this).
    const info = replyOf(await send('control', request('kernel_info_request', {})));
    expect(info.content.status).toBe('ok');
    expect(transport.sent.some((s) => s.message.parent_header.msg_id === running.header.msg_id && s.channel === 'shell')).toBe(false);
    const interrupt = request('interrupt_request', {});
    const sent = await send('control', interrupt);
    expect(sent.find((s) => s.channel === 'control')?.message.content).toEqual({ status: 'ok' });
    expect(sent.find((s) => s.channel === 'control')?.message.header.msg_type).toBe('interrupt_reply');
    const cell = replyOf(await answers(running));
    expect(cell.content).toMatchObject({ status: 'error', ename: 'Interrupted', execution_count: 2 });
    await pause(5); // a request dated the same millisecond as the failure counts as queued behind it (stop_on_error)
    expect((await execute('kept')).iopub.find((m) => m.header.msg_type === 'execute_result')?.content.data).toEqual({ 'text/plain': '42' });
  });

  it('stdin: input_request goes to the requesting client with the execute request as parent; without allow_stdin the cell is refused input (spec [Messages on the stdin channel])', async () => {
    const { transport, execute, answers } = setUp();
    const asking = request('execute_request', { code: 'ask("name?")', allow_stdin: true });
    transport.deliver('shell', asking);
    let prompt;
    for (let i = 0; i < 500 && !(prompt = transport.sent.find((s) => s.channel === 'stdin')); i++) await pause(2);
    expect(prompt?.message.header.msg_type).toBe('input_request');
    expect(prompt?.message.content).toEqual({ prompt: 'name?', password: false });
    expect(prompt?.message.parent_header).toEqual(asking.header);
    expect(prompt?.message.identities).toEqual(asking.identities);
    const answer = request('input_reply', { value: 'Ada' });
    answer.parent_header = { ...prompt!.message.header };
    transport.deliver('stdin', answer);
    const sent = await answers(asking);
    expect(sent.find((s) => s.message.header.msg_type === 'execute_result')?.message.content.data).toEqual({ 'text/plain': '"Ada"' });
    const refused = await execute('ask("name?")', { allow_stdin: false });
    expect(refused.reply.content).toMatchObject({ status: 'error', ename: 'InputError' });
    expect(String(refused.reply.content.evalue)).toContain('allow_stdin');
    expect(transport.sent.filter((s) => s.channel === 'stdin')).toHaveLength(1);
  });

  it('comms: comm_open/comm_msg/comm_close from the front end reach the executor; comm_info lists open comms, by target (spec [Custom Messages], [Comm info])', async () => {
    const { send } = setUp();
    const open = (id: string, target: string) => send('shell', request('comm_open', { comm_id: id, target_name: target, data: {} }));
    await open('c-1', 'plot.echo');
    await open('c-2', 'plot.other');
    const all = replyOf(await send('shell', request('comm_info_request', {}))).content;
    expect(all).toEqual({ status: 'ok', comms: { 'c-1': { target_name: 'plot.echo' }, 'c-2': { target_name: 'plot.other' } } });
    const one = replyOf(await send('shell', request('comm_info_request', { target_name: 'plot.other' }))).content;
    expect(one.comms).toEqual({ 'c-2': { target_name: 'plot.other' } });
    // A comm message has no reply; what the executor sends back is published with it as parent.
    const message = request('comm_msg', { comm_id: 'c-1', data: { value: 3 } });
    const sent = await send('shell', message);
    expect(sent.filter((s) => s.channel !== 'iopub')).toHaveLength(0);
    const echo = sent.find((s) => s.message.header.msg_type === 'comm_msg');
    expect(echo?.message.content).toEqual({ comm_id: 'c-1', data: { echo: { value: 3 } } });
    expect(echo?.message.parent_header).toEqual(message.header);
    await send('shell', request('comm_close', { comm_id: 'c-1', data: {} }));
    expect(replyOf(await send('shell', request('comm_info_request', {}))).content.comms).toEqual({ 'c-2': { target_name: 'plot.other' } });
  });

  it('shutdown_request: the reply echoes restart, the executor is stopped, then the host is told whether to restart (spec [Kernel shutdown])', async () => {
    for (const restart of [false, true]) {
      const { executor, shutdowns, send } = setUp();
      const asked = request('shutdown_request', { restart });
      const sent = await send('control', asked);
      const reply = sent.find((s) => s.channel === 'control')!.message;
      expect(reply.header.msg_type).toBe('shutdown_reply');
      expect(reply.content).toEqual({ status: 'ok', restart });
      // Also broadcast on iopub, so every client learns of it (common practice, as ipykernel does; from memory).
      expect(sent.find((s) => s.channel === 'iopub' && s.message.header.msg_type === 'shutdown_reply')?.message.content).toEqual({ status: 'ok', restart });
      expect(executor.stopped).toBe(true);
      expect(shutdowns).toEqual([restart]);
    }
  });

  it('an unknown message type gets no reply and no status, and the kernel carries on (common practice: ipykernel logs and ignores it; from memory)', async () => {
    const { transport, send } = setUp();
    const before = transport.sent.length;
    transport.deliver('shell', request('frobnicate_request', {}));
    transport.deliver('control', request('frobnicate_request', {}));
    await pause(20);
    expect(transport.sent.length).toBe(before);
    expect(replyOf(await send('shell', request('kernel_info_request', {}))).content.status).toBe('ok');
  });

  it('a malformed request gets an error reply naming the field and the value, bracketed by busy/idle (chernel\'s rule; reply shape: spec [Request-Reply])', async () => {
    const { send, execute } = setUp();
    const sent = await send('shell', request('execute_request', { code: 42 }));
    expect(replyOf(sent).content).toEqual({
      status: 'error',
      ename: 'RequestError',
      evalue: 'execute_request.content.code: expected a string, got 42',
      traceback: ['RequestError: execute_request.content.code: expected a string, got 42'],
    });
    expect(types(sent.map((s) => s.message))).toEqual(['status:busy', 'execute_reply', 'status:idle']);
    expect((await execute('1')).reply.content).toMatchObject({ status: 'ok', execution_count: 1 });
  });
});
