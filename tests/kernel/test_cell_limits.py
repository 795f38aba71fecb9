"""Cells that exhaust memory or flood output, through Debian's jupyter_client: the kernel's own
process survives, the reply names the cause and what was lost, and the cell process is restarted
by itself within a few seconds (common practice for Jupyter kernels: a cell's failure is a reply,
never a dead kernel)."""

import os
import shutil
import tempfile
import time
import unittest
from pathlib import Path

import harness

MEMORY_MB = 1024
OUTPUT_MB = 1


class CellLimits(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        os.environ["CHERNEL_CELL_MEMORY_MB"] = str(MEMORY_MB)
        os.environ["CHERNEL_OUTPUT_MB"] = str(OUTPUT_MB)
        cls.tmp = Path(tempfile.mkdtemp(prefix="chernel-limits-"))
        try:
            cls.km, cls.kc = harness.start_kernel(cwd=cls.tmp)
        finally:
            del os.environ["CHERNEL_CELL_MEMORY_MB"]
            del os.environ["CHERNEL_OUTPUT_MB"]
        cls.pid = cls.km.provisioner.process.pid

    @classmethod
    def tearDownClass(cls):
        harness.stop_kernel(cls.km, cls.kc)
        shutil.rmtree(cls.tmp, ignore_errors=True)

    def assert_alive_and_restarted(self, reply, cause):
        self.assertEqual(reply["status"], "error")
        self.assertEqual(reply["ename"], "StateReset")
        self.assertIn(cause, reply["evalue"])
        self.assertIn("all state was reset", reply["evalue"])
        self.assertTrue(self.km.is_alive())
        self.assertEqual(self.km.provisioner.process.pid, self.pid, "the kernel process itself must not restart")
        start = time.monotonic()
        self.assertEqual(harness.value(self.kc, "6 * 7", timeout=30), "42")
        self.assertLess(time.monotonic() - start, 10, "the cell process must be back within a few seconds")

    def test_an_array_past_the_largest_size_ends_the_cell_process_not_the_kernel(self):
        harness.value(self.kc, "const lost = 1")
        reply, _ = harness.run(self.kc, "const a: number[] = []; for (let i = 0; i < 2e8; i++) a.push(i); a.length", timeout=120)
        self.assert_alive_and_restarted(reply, "out of memory")
        reply, _ = harness.run(self.kc, "lost")
        self.assertEqual(reply["ename"], "ReferenceError", "the reply said state was reset: it must be")

    def test_a_heap_past_its_limit_is_named_out_of_memory(self):
        reply, _ = harness.run(self.kc, "const objs: object[] = []; for (;;) objs.push({ n: objs.length, s: 'x' + objs.length });", timeout=120)
        self.assert_alive_and_restarted(reply, "out of memory")

    def test_typed_arrays_are_bounded_and_the_cell_keeps_its_state(self):
        harness.value(self.kc, "const kept = 'still here'")
        start = time.monotonic()
        reply, _ = harness.run(self.kc, "const held: Float64Array[] = []; for (;;) held.push(new Float64Array(1e8));", timeout=120)
        self.assertLess(time.monotonic() - start, 30)
        self.assertEqual(reply["status"], "error")
        self.assertEqual(reply["ename"], "RangeError")
        self.assertIn(f"memory limit is {MEMORY_MB} MB", reply["evalue"])
        self.assertEqual(harness.value(self.kc, "kept"), "'still here'")

    def test_written_typed_arrays_are_bounded_too(self):
        reply, _ = harness.run(self.kc, "const filled: Float64Array[] = []; for (;;) filled.push(new Float64Array(1e7).fill(1));", timeout=120)
        self.assertEqual(reply["status"], "error")
        self.assertIn("memory", reply["evalue"])
        self.assertTrue(self.km.is_alive())
        self.assertEqual(harness.value(self.kc, "6 * 7"), "42")

    def test_a_model_cannot_allocate_through_its_expressions(self):
        code = ("compute({kind: 'bands', model: {format: 'chernel.model', version: 1, name: 'm', periodic: 1, vectors: [[1]], "
                "orbitals: [{label: 'a', position: [0]}], parameters: {}, "
                "terms: [{from: 'a', to: 'a', cell: [1], amplitude: 'size(range(1, 1e9))[1]'}]}, path: [[0], [1]]})")
        reply, _ = harness.run(self.kc, code, timeout=60)
        self.assertEqual(reply["status"], "error")
        self.assertIn("terms[0].amplitude", reply["evalue"])
        self.assertIn("range", reply["evalue"])
        self.assertEqual(harness.value(self.kc, "6 * 7"), "42")

    def test_output_is_capped_and_says_where_the_rest_went(self):
        reply, outputs = harness.run(self.kc, "for (let i = 0; i < 3000; i++) console.log('y'.repeat(1000)); 'done'", timeout=60)
        self.assertEqual(reply["status"], "ok")
        text = "".join(c["text"] for t, c, _ in outputs if t == "stream")
        self.assertLess(len(text), OUTPUT_MB * 1_000_000 + 10_000)
        self.assertIn("output capped", text)
        self.assertIn("chernel-output/", text)
        self.assertEqual(harness.result_text(outputs), "'done'")
        # The rest went where the note says, in the kernel's folder: every line accounted for.
        kept = sorted((self.tmp / "chernel-output").glob("*.txt"))
        self.assertEqual(len(kept), 1)
        rest = kept[0].read_text()
        self.assertIn(kept[0].name, text)
        self.assertEqual(text.count("y" * 1000) + rest.count("y" * 1000), 3000)

    def test_malformed_requests_from_cells_name_the_field_and_keep_state(self):
        harness.value(self.kc, "const survivor = 'kept'")
        cases = [
            ("compute({kind: 'chern', model: qwz(), gird: 64})", "gird", 'did you mean "grid"'),
            ("compute({kind: 'chern', model: qwz(), param: {u: 3}})", "param", 'did you mean "params"'),
            ("compute({kind: 'chern', model: qwz(), parms: {u: 99}})", "parms", 'did you mean "params"'),
            ("compute({kind: 'chern', model: qwz(), params: JSON.parse('{\"__proto__\": 1}')})", "params.__proto__", "has no parameter"),
            ("compute({kind: 'chern', model: qwz(), params: {toString: 1}})", "params.toString", "has no parameter"),
            ("compute({kind: 'chern', model: qwz(), grid: 100000})", "grid", "the largest grid that fits is"),
            ("compute({kind: 'z2', model: kaneMele(), grid: 100000})", "grid", "the largest grid that fits is"),
            ("compute({kind: 'ribbon', model: qwz(), direction: 0, width: 100000})", "width", "the largest width that fits is"),
            ("compute({kind: 'phase-map', model: qwz(), quantity: 'chern', axes: [{param: 'u', from: -3, to: 3, count: 1e9}]})", "axes[0].count", "fits is"),
            ("qwz({uu: 3})", "qwz", "did you mean params: {u: ...}"),
            ("show(qwz(), {kind: 'curvature', gird: 32})", "gird", 'did you mean "grid"'),
            ("show(qwz(), {kind: 'bands', tolerence: 1})", "tolerence", 'did you mean "tolerance"'),
            ("hofstadter(1, 1e6)", "flux.q", "the largest q that fits is"),
        ]
        for code, field, hint in cases:
            reply, _ = harness.run(self.kc, code, timeout=30)
            self.assertEqual(reply["status"], "error", code)
            self.assertIn(reply["ename"], ("ModelError", "WidgetOptionError"), code)
            self.assertTrue(reply["evalue"].startswith(f"{field}: "), f"{code}: {reply['evalue']}")
            self.assertIn(hint, reply["evalue"], code)
        self.assertEqual(harness.value(self.kc, "survivor"), "'kept'")
        result = harness.value(self.kc, "JSON.stringify(compute({kind: 'chern', model: qwz(), grid: 16, params: {u: -1}}).params)")
        self.assertEqual(result, "'{\"u\":-1}'")

    def test_an_interrupt_stops_one_long_eigensolve_and_keeps_state(self):
        harness.value(self.kc, "const wide = ribbon(qwz(), 0, 750); wide.orbitals.length")
        msg_id = self.kc.execute("compute({kind: 'bands', model: wide, pointsPerSegment: 3})")
        time.sleep(2.0)
        sent = time.monotonic()
        self.km.interrupt_kernel()
        reply = harness.shell_reply(self.kc, msg_id, timeout=30)
        elapsed = time.monotonic() - sent
        self.assertEqual(reply["content"]["ename"], "InterruptedError")
        self.assertLess(elapsed, 1.5, f"the interrupt took {elapsed:.2f} s")
        self.assertEqual(harness.value(self.kc, "wide.orbitals.length"), "1500")

    def test_state_lost_between_cells_is_said_by_the_next_cell(self):
        harness.value(self.kc, "const before = 1")
        code = "setTimeout(() => { const a: number[] = []; for (let i = 0; i < 2e8; i++) a.push(i); }, 50); 'scheduled'"
        self.assertEqual(harness.value(self.kc, code), "'scheduled'")
        time.sleep(12)  # no cell runs while the background code fills the memory (about 4 s) and the process restarts
        reply, outputs = harness.run(self.kc, "typeof before", timeout=60)
        text = "".join(c.get("text", "") for t, c, _ in outputs if t == "stream")
        self.assertIn("StateReset: between cells, out of memory", text)
        self.assertEqual(harness.result_text(outputs), "'undefined'")
        self.assertTrue(self.km.is_alive())

    def test_an_error_aborts_only_its_own_clients_queued_cells(self):
        from jupyter_client import BlockingKernelClient
        from jupyter_client.session import Session

        other = BlockingKernelClient()
        other.load_connection_info(self.km.get_connection_info())
        other.session = Session(key=self.km.session.key, signature_scheme=self.km.session.signature_scheme)
        self.assertNotEqual(other.session.session, self.kc.session.session)
        other.start_channels()
        try:
            failing = self.kc.execute("await new Promise((r) => setTimeout(r, 800)); throw new Error('first client fails')")
            mine = self.kc.execute("'queued by the first client'")
            theirs = other.execute("'queued by the second client'")
            self.assertEqual(harness.shell_reply(self.kc, failing)["content"]["status"], "error")
            self.assertEqual(harness.shell_reply(self.kc, mine)["content"]["status"], "aborted")
            self.assertEqual(harness.shell_reply(other, theirs)["content"]["status"], "ok")
        finally:
            other.stop_channels()


if __name__ == "__main__":
    unittest.main()
