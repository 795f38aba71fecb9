"""Heartbeat, control and interrupts while cells compute, through jupyter_client and raw ZeroMQ.

The bounds asserted here (a heartbeat reply within 1 s, an interrupt honoured within 1 s, a runaway
loop ended within 5 s) are the kernel's responsiveness contract from its issue, not speed targets."""

import time
import unittest

import harness
import zmq

# A long sweep of the engine: a Chern-number phase map over many parameter points. Engine loops
# call checkInterrupt() once per row of k-points.
LONG_SWEEP = """
const sweep = compute({kind: 'phase-map', model: qwz(), axes: [{param: 'u', from: -3, to: 3, count: 200000}], quantity: 'chern', grid: 32})
"""


def wait_busy(kc, msg_id, timeout=10):
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        msg = kc.get_iopub_msg(timeout=timeout)
        if (
            msg["parent_header"].get("msg_id") == msg_id
            and msg["msg_type"] == "execute_input"
        ):
            return
    raise AssertionError("the cell never started")


class Responsiveness(unittest.TestCase):
    def setUp(self):
        self.km, self.kc = harness.start_kernel()

    def tearDown(self):
        harness.stop_kernel(self.km, self.kc)

    def ping(self, context, port, timeout_ms=1000):
        """One heartbeat round trip on a fresh REQ socket; True if echoed within the timeout."""
        sock = context.socket(zmq.REQ)
        sock.linger = 0
        sock.connect(f"tcp://127.0.0.1:{port}")
        try:
            sock.send(b"ping")
            if sock.poll(timeout_ms):
                return sock.recv() == b"ping"
            return False
        finally:
            sock.close()

    def control_kernel_info(self, timeout=1.0):
        msg = self.kc.session.msg("kernel_info_request")
        self.kc.control_channel.send(msg)
        deadline = time.monotonic() + timeout
        while time.monotonic() < deadline:
            try:
                reply = self.kc.get_control_msg(timeout=max(0.01, deadline - time.monotonic()))
            except Exception:
                break
            if reply["parent_header"].get("msg_id") == msg["header"]["msg_id"]:
                return reply
        return None

    def test_heartbeat_and_control_answer_during_a_30_s_computation(self):
        msg_id = self.kc.execute(
            "const until = Date.now() + 30000; let spins = 0;\n"
            "while (Date.now() < until) { spins++ }\n"
            "spins > 0"
        )
        wait_busy(self.kc, msg_id)
        context = zmq.Context()
        port = self.km.hb_port
        answered = 0
        start = time.monotonic()
        try:
            for second in range(28):
                next_tick = start + second + 1
                self.assertTrue(self.ping(context, port), f"no heartbeat reply in second {second + 1} of the computation")
                answered += 1
                if second % 7 == 3:
                    self.assertIsNotNone(self.control_kernel_info(), "control channel did not answer kernel_info during the computation")
                time.sleep(max(0.0, next_tick - time.monotonic()))
        finally:
            context.destroy(linger=0)
        # The computation was still running all along: its reply comes after the pings.
        reply = harness.shell_reply(self.kc, msg_id, timeout=20)
        self.assertEqual(reply["content"]["status"], "ok")
        self.assertEqual(answered, 28)

    def test_interrupt_stops_a_long_sweep_within_1_s_and_keeps_state(self):
        self.assertEqual(harness.value(self.kc, "const kept = 7; kept"), "7")
        msg_id = self.kc.execute(LONG_SWEEP)
        wait_busy(self.kc, msg_id)
        time.sleep(1.0)
        sent = time.monotonic()
        self.km.interrupt_kernel()
        reply = harness.shell_reply(self.kc, msg_id, timeout=10)
        elapsed = time.monotonic() - sent
        self.assertLess(elapsed, 1.0, f"interrupt took {elapsed:.2f} s")
        self.assertEqual(reply["content"]["status"], "error")
        self.assertEqual(reply["content"]["ename"], "InterruptedError")
        self.assertIn("kept", "\n".join(reply["content"]["traceback"]))
        # Variables of earlier cells are still there, and the engine works again.
        self.assertEqual(harness.value(self.kc, "kept"), "7")
        self.assertEqual(harness.value(self.kc, "compute({kind: 'chern', model: qwz(), params: {u: -1.5}, bands: 1}).checks.minGap > 0"), "true")

    def test_interrupt_of_an_awaiting_cell_keeps_state(self):
        harness.value(self.kc, "const kept = 'yes'")
        msg_id = self.kc.execute("await new Promise(() => {})")
        wait_busy(self.kc, msg_id)
        time.sleep(0.3)
        sent = time.monotonic()
        self.km.interrupt_kernel()
        reply = harness.shell_reply(self.kc, msg_id, timeout=10)
        self.assertLess(time.monotonic() - sent, 1.0)
        self.assertEqual(reply["content"]["ename"], "InterruptedError")
        self.assertEqual(harness.value(self.kc, "kept"), "'yes'")

    def test_runaway_loop_is_ended_within_5_s_and_the_reply_says_state_was_reset(self):
        harness.value(self.kc, "const before = 1")
        msg_id = self.kc.execute("while (true) {}")
        wait_busy(self.kc, msg_id)
        time.sleep(0.5)
        sent = time.monotonic()
        self.km.interrupt_kernel()
        reply = harness.shell_reply(self.kc, msg_id, timeout=15)
        elapsed = time.monotonic() - sent
        self.assertLess(elapsed, 5.0, f"recovery took {elapsed:.2f} s")
        content = reply["content"]
        self.assertEqual(content["status"], "error")
        self.assertIn("state was reset", content["evalue"])
        # The kernel serves again, with the engine in scope and the old variables gone.
        self.assertEqual(harness.value(self.kc, "typeof before"), "'undefined'")
        self.assertEqual(harness.value(self.kc, "typeof validateModel"), "'function'")
        self.assertEqual(harness.value(self.kc, "1 + 1"), "2")


if __name__ == "__main__":
    unittest.main()
