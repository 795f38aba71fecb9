/**
 * The protocol layer: a dispatch table of message handlers between a Transport and a CellExecutor
 * (both interfaces: messages.ts, executor.ts), each handler bracketed by busy/idle status on iopub.
 * Shell requests run one at a time in arrival order; control requests (interrupt, shutdown,
 * kernel_info) are answered at once, even while a cell runs.
 */

import { randomUUID } from 'node:crypto';
import { userInfo } from 'node:os';
import { version as esbuildVersion } from 'esbuild';
import { log } from '../log.js';
import { codePointLength, codePointsToIndex, completionContext, isComplete, KEYWORDS, pathAt } from './code.js';
import type { CellExecutor, CommEvent, ExecutorEvents, ExecutorFactory } from './executor.js';
import { History } from './history.js';
import { PROTOCOL_VERSION, type Channel, type Dict, type Header, type Message, type Transport } from './messages.js';

export const KERNEL_VERSION = '0.1.0';

type Handler = (message: Message, channel: Channel) => Promise<void> | void;

interface CurrentExecution {
  message: Message;
  allowStdin: boolean;
}

/** A field of a request's content, checked; the error names the field and the value. */
function field<T>(message: Message, name: string, type: 'string' | 'number' | 'boolean' | 'object', fallback?: T): T {
  const value = message.content[name];
  if (value === undefined && fallback !== undefined) return fallback;
  const ok = type === 'object' ? typeof value === 'object' && value !== null && !Array.isArray(value) : typeof value === type;
  if (!ok) throw new RequestError(`${message.header.msg_type}.content.${name}: expected a ${type}, got ${JSON.stringify(value) ?? 'nothing'}`);
  return value as T;
}

class RequestError extends Error {
  override name = 'RequestError';
}

export class Kernel {
  private readonly session = randomUUID();
  private readonly username = (() => {
    try {
      return userInfo().username;
    } catch {
      return 'chernel';
    }
  })();
  private readonly executor: CellExecutor;
  private readonly history = new History();
  private executionCount = 0;
  /** Parent of iopub output from user code: the shell request being handled (or the last one). */
  private parent: Message | null = null;
  private current: CurrentExecution | null = null;
  private pendingInput: { resolve: (value: string) => void; reject: (error: Error) => void } | null = null;
  private readonly shellQueue: Message[] = [];
  /** The latest failed cell with stop_on_error: its client's execute requests sent before it are aborted. */
  private failure: { session: string; at: number } | null = null;
  private shellBusy = false;
  private readonly shell: Record<string, Handler>;
  private readonly control: Record<string, Handler>;

  constructor(
    private readonly transport: Transport,
    createExecutor: ExecutorFactory,
    private readonly onShutdown: (restart: boolean) => void,
  ) {
    this.executor = createExecutor(this.executorEvents());
    this.shell = {
      kernel_info_request: (m, c) => this.kernelInfo(m, c),
      execute_request: (m) => this.execute(m),
      complete_request: (m) => this.complete(m),
      inspect_request: (m) => this.inspect(m),
      is_complete_request: (m) => this.isComplete(m),
      history_request: (m) => this.historyRequest(m),
      comm_info_request: (m) => this.commInfo(m),
      comm_open: (m) => this.commFromFrontend(m),
      comm_msg: (m) => this.commFromFrontend(m),
      comm_close: (m) => this.commFromFrontend(m),
      shutdown_request: (m, c) => this.shutdown(m, c),
    };
    this.control = {
      kernel_info_request: (m, c) => this.kernelInfo(m, c),
      interrupt_request: (m, c) => this.interrupt(m, c),
      shutdown_request: (m, c) => this.shutdown(m, c),
    };
    transport.onMessage((channel, message) => this.receive(channel, message));
    this.publish('status', { execution_state: 'starting' }, null);
  }

  // --- sending -------------------------------------------------------------------------------------
  private header(msgType: string): Header {
    return { msg_id: randomUUID(), msg_type: msgType, session: this.session, username: this.username, date: new Date().toISOString(), version: PROTOCOL_VERSION };
  }

  private publish(msgType: string, content: Dict, parent: Message | null = this.parent, metadata: Dict = {}, buffers: Uint8Array[] = []): void {
    this.transport.send('iopub', {
      identities: [Buffer.from(`kernel.${this.session}.${msgType}`)],
      header: this.header(msgType),
      parent_header: parent ? { ...parent.header } : {},
      metadata,
      content,
      buffers,
    });
  }

  private reply(request: Message, channel: Channel, content: Dict, metadata: Dict = {}): void {
    const msgType = request.header.msg_type.replace(/_request$/, '_reply');
    this.transport.send(channel, { identities: request.identities, header: this.header(msgType), parent_header: { ...request.header }, metadata, content, buffers: [] });
  }

  // --- receiving -----------------------------------------------------------------------------------
  private receive(channel: Channel, message: Message): void {
    if (channel === 'stdin') {
      this.inputReply(message);
      return;
    }
    if (channel === 'control') {
      void this.dispatch(this.control, message, channel);
      return;
    }
    this.shellQueue.push(message);
    void this.drainShell();
  }

  private async drainShell(): Promise<void> {
    if (this.shellBusy) return;
    this.shellBusy = true;
    try {
      let message;
      while ((message = this.shellQueue.shift())) await this.dispatch(this.shell, message, 'shell');
    } finally {
      this.shellBusy = false;
    }
  }

  private async dispatch(table: Record<string, Handler>, message: Message, channel: Channel): Promise<void> {
    const type = message.header.msg_type;
    const handler = Object.prototype.hasOwnProperty.call(table, type) ? table[type] : undefined;
    if (!handler) {
      log(`ignored ${channel} message of unknown type "${type}"`);
      return;
    }
    this.publish('status', { execution_state: 'busy' }, message);
    try {
      await handler(message, channel);
    } catch (error) {
      // A malformed request gets an error reply naming the field; the kernel carries on.
      log(`${type} failed: ${(error as Error).message}`);
      if (type.endsWith('_request')) {
        const e = error as Error;
        this.reply(message, channel, { status: 'error', ename: e.name, evalue: e.message, traceback: [`${e.name}: ${e.message}`] });
      }
    } finally {
      this.publish('status', { execution_state: 'idle' }, message);
    }
  }

  // --- executor output -----------------------------------------------------------------------------
  private executorEvents(): ExecutorEvents {
    return {
      stream: (name, text) => this.publish('stream', { name, text }),
      display: (output, displayId, update) =>
        this.publish(update ? 'update_display_data' : 'display_data', {
          data: output.data,
          metadata: output.metadata,
          transient: displayId ? { display_id: displayId } : {},
        }),
      clearOutput: (wait) => this.publish('clear_output', { wait }),
      comm: (event: CommEvent) => {
        const content: Dict = { comm_id: event.commId, data: event.data };
        if (event.type === 'comm_open') content.target_name = event.targetName;
        this.publish(event.type, content, this.parent, event.metadata, event.buffers);
      },
      input: (prompt, password) => this.requestInput(prompt, password),
    };
  }

  private requestInput(prompt: string, password: boolean): Promise<string> {
    const current = this.current;
    if (!current || !current.allowStdin) {
      return Promise.reject(new Error('input: this front end does not accept input (execute_request.allow_stdin is false)'));
    }
    this.pendingInput?.reject(new Error('input: superseded by a newer input request'));
    return new Promise((resolve, reject) => {
      this.pendingInput = { resolve, reject };
      this.transport.send('stdin', {
        identities: current.message.identities,
        header: this.header('input_request'),
        parent_header: { ...current.message.header },
        metadata: {},
        content: { prompt, password },
        buffers: [],
      });
    });
  }

  private inputReply(message: Message): void {
    if (message.header.msg_type !== 'input_reply' || !this.pendingInput) {
      log(`ignored stdin message "${message.header.msg_type}" (no input pending)`);
      return;
    }
    const { resolve } = this.pendingInput;
    this.pendingInput = null;
    resolve(typeof message.content.value === 'string' ? message.content.value : '');
  }

  // --- handlers ------------------------------------------------------------------------------------
  private kernelInfo(message: Message, channel: Channel): void {
    this.reply(message, channel, {
      status: 'ok',
      protocol_version: PROTOCOL_VERSION,
      implementation: 'chernel',
      implementation_version: KERNEL_VERSION,
      language_info: {
        name: 'typescript',
        version: `ES2022 (types stripped by esbuild ${esbuildVersion})`,
        mimetype: 'text/typescript',
        file_extension: '.ts',
        pygments_lexer: 'typescript',
        codemirror_mode: 'text/typescript',
      },
      banner: `chernel ${KERNEL_VERSION}: TypeScript cells with a band-topology engine in scope (Node ${process.version})`,
      help_links: [],
      debugger: false,
    });
  }

  private async execute(message: Message): Promise<void> {
    if (this.sentBeforeFailure(message)) {
      this.reply(message, 'shell', { status: 'aborted', execution_count: this.executionCount });
      return;
    }
    const code = field<string>(message, 'code', 'string');
    const silent = field<boolean>(message, 'silent', 'boolean', false);
    const storeHistory = !silent && field<boolean>(message, 'store_history', 'boolean', true);
    const stopOnError = field<boolean>(message, 'stop_on_error', 'boolean', true);
    const allowStdin = field<boolean>(message, 'allow_stdin', 'boolean', false);
    const userExpressions = field<Dict>(message, 'user_expressions', 'object', {});

    if (storeHistory) this.executionCount++;
    const count = this.executionCount;
    this.parent = message;
    if (!silent) this.publish('execute_input', { code, execution_count: count });
    if (storeHistory) this.history.add({ line: count, input: code, output: null });

    this.current = { message, allowStdin };
    const outcome = await this.executor.execute(code, { silent, label: storeHistory ? `In [${count}]` : 'cell' }).finally(() => {
      this.current = null;
      this.pendingInput?.reject(new Error('input: the cell finished'));
      this.pendingInput = null;
    });

    if (outcome.status === 'ok') {
      if (outcome.result && !silent) {
        this.publish('execute_result', { execution_count: count, data: outcome.result.data, metadata: outcome.result.metadata });
        const text = outcome.result.data['text/plain'];
        if (storeHistory && typeof text === 'string') this.history.setOutput(count, text);
      }
      const expressions = await this.userExpressions(userExpressions);
      this.reply(message, 'shell', { status: 'ok', execution_count: count, user_expressions: expressions, payload: [] });
      return;
    }
    const { ename, evalue, traceback } = outcome;
    this.publish('error', { ename, evalue, traceback });
    this.reply(message, 'shell', { status: 'error', execution_count: count, ename, evalue, traceback });
    if (stopOnError) this.abortQueuedExecutions(message);
  }

  private async userExpressions(expressions: Dict): Promise<Dict> {
    const results: Dict = {};
    for (const [name, expression] of Object.entries(expressions)) {
      if (typeof expression !== 'string') {
        results[name] = { status: 'error', ename: 'TypeError', evalue: `user_expressions.${name}: expected a string`, traceback: [] };
        continue;
      }
      const outcome = await this.executor.execute(`(${expression})`, { silent: false, label: `user expression ${name}` });
      results[name] = outcome.status === 'ok'
        ? { status: 'ok', data: outcome.result?.data ?? { 'text/plain': 'undefined' }, metadata: outcome.result?.metadata ?? {} }
        : { status: 'error', ename: outcome.ename, evalue: outcome.evalue, traceback: outcome.traceback };
    }
    return results;
  }

  /**
   * Whether an execute request was sent (its header's date) by the client of the latest failed cell
   * before that cell failed: sent with it, so aborted with the queue even if it reached the socket
   * after the failure.
   */
  private sentBeforeFailure(message: Message): boolean {
    if (this.failure === null || this.failure.session !== message.header.session) return false;
    const sent = Date.parse(message.header.date);
    return Number.isFinite(sent) && sent <= this.failure.at;
  }

  /**
   * stop_on_error: the execute requests the same client (session) already queued are answered
   * `aborted`, not run. Another client's queued cells do not depend on this one: they still run.
   */
  private abortQueuedExecutions(failed: Message): void {
    // Requests the client sent with the failed one may still be in flight: abort those when they arrive.
    this.failure = { session: failed.header.session, at: Date.now() };
    const queued = this.shellQueue.filter((m) => m.header.msg_type === 'execute_request' && m.header.session === failed.header.session);
    for (const message of queued) {
      this.shellQueue.splice(this.shellQueue.indexOf(message), 1);
      this.publish('status', { execution_state: 'busy' }, message);
      this.reply(message, 'shell', { status: 'aborted', execution_count: this.executionCount });
      this.publish('status', { execution_state: 'idle' }, message);
    }
  }

  private async complete(message: Message): Promise<void> {
    const code = field<string>(message, 'code', 'string');
    const cursor = field<number>(message, 'cursor_pos', 'number', codePointLength(code));
    const { path, prefix } = completionContext(code.slice(0, codePointsToIndex(code, cursor)));
    let candidates: string[];
    if (path.length > 0) {
      candidates = (await this.executor.names(path)) ?? [];
    } else {
      candidates = [...((await this.executor.names([])) ?? []), ...this.executor.engineNames, ...KEYWORDS];
    }
    const matches = [...new Set(candidates.filter((c) => c.startsWith(prefix) && /^[A-Za-z_$][\w$]*$/.test(c)))].sort((a, b) => a.localeCompare(b));
    this.reply(message, 'shell', { status: 'ok', matches, cursor_start: cursor - codePointLength(prefix), cursor_end: cursor, metadata: {} });
  }

  private async inspect(message: Message): Promise<void> {
    const code = field<string>(message, 'code', 'string');
    const cursor = field<number>(message, 'cursor_pos', 'number', codePointLength(code));
    const path = pathAt(code, codePointsToIndex(code, cursor));
    const text = path.length ? await this.executor.inspect(path) : null;
    if (text === null) {
      this.reply(message, 'shell', { status: 'ok', found: false, data: {}, metadata: {} });
      return;
    }
    this.reply(message, 'shell', { status: 'ok', found: true, data: { 'text/plain': text }, metadata: {} });
  }

  private async isComplete(message: Message): Promise<void> {
    const code = field<string>(message, 'code', 'string');
    this.reply(message, 'shell', await isComplete(code));
  }

  private historyRequest(message: Message): void {
    this.reply(message, 'shell', { status: 'ok', history: this.history.query(message.content) });
  }

  private commInfo(message: Message): void {
    const target = message.content.target_name;
    const comms: Dict = {};
    for (const [id, targetName] of this.executor.comms()) {
      if (typeof target !== 'string' || target === targetName) comms[id] = { target_name: targetName };
    }
    this.reply(message, 'shell', { status: 'ok', comms });
  }

  private async commFromFrontend(message: Message): Promise<void> {
    const type = message.header.msg_type as 'comm_open' | 'comm_msg' | 'comm_close';
    const commId = field<string>(message, 'comm_id', 'string');
    const data = field<Dict>(message, 'data', 'object', {});
    const payload = { commId, data, metadata: message.metadata, buffers: message.buffers.map((b) => new Uint8Array(b)) };
    this.parent = message;
    if (type === 'comm_open') await this.executor.comm({ type, targetName: field<string>(message, 'target_name', 'string'), ...payload });
    else await this.executor.comm({ type, ...payload });
  }

  /** SIGINT from a client using signal-mode interrupts. */
  interruptFromSignal(): void {
    this.executor.interrupt();
  }

  private interrupt(message: Message, channel: Channel): void {
    this.executor.interrupt();
    this.reply(message, channel, { status: 'ok' });
  }

  private async shutdown(message: Message, channel: Channel): Promise<void> {
    const restart = message.content.restart === true;
    this.reply(message, channel, { status: 'ok', restart });
    this.publish('shutdown_reply', { status: 'ok', restart }, message);
    await this.executor.shutdown();
    this.onShutdown(restart);
  }
}
