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
import { History } from './history.js';
import { PROTOCOL_VERSION } from './messages.js';
export const KERNEL_VERSION = '0.1.0';
/** A field of a request's content, checked; the error names the field and the value. */
function field(message, name, type, fallback) {
    const value = message.content[name];
    if (value === undefined && fallback !== undefined)
        return fallback;
    const ok = type === 'object' ? typeof value === 'object' && value !== null && !Array.isArray(value) : typeof value === type;
    if (!ok)
        throw new RequestError(`${message.header.msg_type}.content.${name}: expected a ${type}, got ${JSON.stringify(value) ?? 'nothing'}`);
    return value;
}
class RequestError extends Error {
    name = 'RequestError';
}
export class Kernel {
    transport;
    onShutdown;
    session = randomUUID();
    username = (() => {
        try {
            return userInfo().username;
        }
        catch {
            return 'chernel';
        }
    })();
    executor;
    history = new History();
    executionCount = 0;
    /** Parent of iopub output from user code: the shell request being handled (or the last one). */
    parent = null;
    current = null;
    pendingInput = null;
    shellQueue = [];
    /** The latest failed cell with stop_on_error: its client's execute requests sent before it are aborted. */
    failure = null;
    shellBusy = false;
    shell;
    control;
    constructor(transport, createExecutor, onShutdown) {
        this.transport = transport;
        this.onShutdown = onShutdown;
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
    header(msgType) {
        return { msg_id: randomUUID(), msg_type: msgType, session: this.session, username: this.username, date: new Date().toISOString(), version: PROTOCOL_VERSION };
    }
    publish(msgType, content, parent = this.parent, metadata = {}, buffers = []) {
        this.transport.send('iopub', {
            identities: [Buffer.from(`kernel.${this.session}.${msgType}`)],
            header: this.header(msgType),
            parent_header: parent ? { ...parent.header } : {},
            metadata,
            content,
            buffers,
        });
    }
    reply(request, channel, content, metadata = {}) {
        const msgType = request.header.msg_type.replace(/_request$/, '_reply');
        this.transport.send(channel, { identities: request.identities, header: this.header(msgType), parent_header: { ...request.header }, metadata, content, buffers: [] });
    }
    // --- receiving -----------------------------------------------------------------------------------
    receive(channel, message) {
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
    async drainShell() {
        if (this.shellBusy)
            return;
        this.shellBusy = true;
        try {
            let message;
            while ((message = this.shellQueue.shift()))
                await this.dispatch(this.shell, message, 'shell');
        }
        finally {
            this.shellBusy = false;
        }
    }
    async dispatch(table, message, channel) {
        const type = message.header.msg_type;
        const handler = Object.prototype.hasOwnProperty.call(table, type) ? table[type] : undefined;
        if (!handler) {
            log(`ignored ${channel} message of unknown type "${type}"`);
            return;
        }
        this.publish('status', { execution_state: 'busy' }, message);
        try {
            await handler(message, channel);
        }
        catch (error) {
            // A malformed request gets an error reply naming the field; the kernel carries on.
            log(`${type} failed: ${error.message}`);
            if (type.endsWith('_request')) {
                const e = error;
                this.reply(message, channel, { status: 'error', ename: e.name, evalue: e.message, traceback: [`${e.name}: ${e.message}`] });
            }
        }
        finally {
            this.publish('status', { execution_state: 'idle' }, message);
        }
    }
    // --- executor output -----------------------------------------------------------------------------
    executorEvents() {
        return {
            stream: (name, text) => this.publish('stream', { name, text }),
            display: (output, displayId, update) => this.publish(update ? 'update_display_data' : 'display_data', {
                data: output.data,
                metadata: output.metadata,
                transient: displayId ? { display_id: displayId } : {},
            }),
            clearOutput: (wait) => this.publish('clear_output', { wait }),
            comm: (event) => {
                const content = { comm_id: event.commId, data: event.data };
                if (event.type === 'comm_open')
                    content.target_name = event.targetName;
                this.publish(event.type, content, this.parent, event.metadata, event.buffers);
            },
            input: (prompt, password) => this.requestInput(prompt, password),
        };
    }
    requestInput(prompt, password) {
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
    inputReply(message) {
        if (message.header.msg_type !== 'input_reply' || !this.pendingInput) {
            log(`ignored stdin message "${message.header.msg_type}" (no input pending)`);
            return;
        }
        const { resolve } = this.pendingInput;
        this.pendingInput = null;
        resolve(typeof message.content.value === 'string' ? message.content.value : '');
    }
    // --- handlers ------------------------------------------------------------------------------------
    kernelInfo(message, channel) {
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
    async execute(message) {
        if (this.sentBeforeFailure(message)) {
            this.reply(message, 'shell', { status: 'aborted', execution_count: this.executionCount });
            return;
        }
        const code = field(message, 'code', 'string');
        const silent = field(message, 'silent', 'boolean', false);
        const storeHistory = !silent && field(message, 'store_history', 'boolean', true);
        const stopOnError = field(message, 'stop_on_error', 'boolean', true);
        const allowStdin = field(message, 'allow_stdin', 'boolean', false);
        const userExpressions = field(message, 'user_expressions', 'object', {});
        if (storeHistory)
            this.executionCount++;
        const count = this.executionCount;
        this.parent = message;
        if (!silent)
            this.publish('execute_input', { code, execution_count: count });
        if (storeHistory)
            this.history.add({ line: count, input: code, output: null });
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
                if (storeHistory && typeof text === 'string')
                    this.history.setOutput(count, text);
            }
            const expressions = await this.userExpressions(userExpressions);
            this.reply(message, 'shell', { status: 'ok', execution_count: count, user_expressions: expressions, payload: [] });
            return;
        }
        const { ename, evalue, traceback } = outcome;
        this.publish('error', { ename, evalue, traceback });
        this.reply(message, 'shell', { status: 'error', execution_count: count, ename, evalue, traceback });
        if (stopOnError)
            this.abortQueuedExecutions(message);
    }
    async userExpressions(expressions) {
        const results = {};
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
    sentBeforeFailure(message) {
        if (this.failure === null || this.failure.session !== message.header.session)
            return false;
        const sent = Date.parse(message.header.date);
        return Number.isFinite(sent) && sent <= this.failure.at;
    }
    /**
     * stop_on_error: the execute requests the same client (session) already queued are answered
     * `aborted`, not run. Another client's queued cells do not depend on this one: they still run.
     */
    abortQueuedExecutions(failed) {
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
    async complete(message) {
        const code = field(message, 'code', 'string');
        const cursor = field(message, 'cursor_pos', 'number', codePointLength(code));
        const { path, prefix } = completionContext(code.slice(0, codePointsToIndex(code, cursor)));
        let candidates;
        if (path.length > 0) {
            candidates = (await this.executor.names(path)) ?? [];
        }
        else {
            candidates = [...((await this.executor.names([])) ?? []), ...this.executor.engineNames, ...KEYWORDS];
        }
        const matches = [...new Set(candidates.filter((c) => c.startsWith(prefix) && /^[A-Za-z_$][\w$]*$/.test(c)))].sort((a, b) => a.localeCompare(b));
        this.reply(message, 'shell', { status: 'ok', matches, cursor_start: cursor - codePointLength(prefix), cursor_end: cursor, metadata: {} });
    }
    async inspect(message) {
        const code = field(message, 'code', 'string');
        const cursor = field(message, 'cursor_pos', 'number', codePointLength(code));
        const path = pathAt(code, codePointsToIndex(code, cursor));
        const text = path.length ? await this.executor.inspect(path) : null;
        if (text === null) {
            this.reply(message, 'shell', { status: 'ok', found: false, data: {}, metadata: {} });
            return;
        }
        this.reply(message, 'shell', { status: 'ok', found: true, data: { 'text/plain': text }, metadata: {} });
    }
    async isComplete(message) {
        const code = field(message, 'code', 'string');
        this.reply(message, 'shell', await isComplete(code));
    }
    historyRequest(message) {
        this.reply(message, 'shell', { status: 'ok', history: this.history.query(message.content) });
    }
    commInfo(message) {
        const target = message.content.target_name;
        const comms = {};
        for (const [id, targetName] of this.executor.comms()) {
            if (typeof target !== 'string' || target === targetName)
                comms[id] = { target_name: targetName };
        }
        this.reply(message, 'shell', { status: 'ok', comms });
    }
    async commFromFrontend(message) {
        const type = message.header.msg_type;
        const commId = field(message, 'comm_id', 'string');
        const data = field(message, 'data', 'object', {});
        const payload = { commId, data, metadata: message.metadata, buffers: message.buffers.map((b) => new Uint8Array(b)) };
        this.parent = message;
        if (type === 'comm_open')
            await this.executor.comm({ type, targetName: field(message, 'target_name', 'string'), ...payload });
        else
            await this.executor.comm({ type, ...payload });
    }
    /** SIGINT from a client using signal-mode interrupts. */
    interruptFromSignal() {
        this.executor.interrupt();
    }
    interrupt(message, channel) {
        this.executor.interrupt();
        this.reply(message, channel, { status: 'ok' });
    }
    async shutdown(message, channel) {
        const restart = message.content.restart === true;
        this.reply(message, channel, { status: 'ok', restart });
        this.publish('shutdown_reply', { status: 'ok', restart }, message);
        await this.executor.shutdown();
        this.onShutdown(restart);
    }
}
//# sourceMappingURL=kernel.js.map