"""10,000 hostile messages on the kernel's shell, control and stdin sockets: wrong and missing
signatures, truncated frames, garbage JSON, wrong types, replays of a signed message. None may
execute, and the kernel must keep serving (common practice for Jupyter kernels: jupyter_client
checks the HMAC before parsing and refuses duplicate signatures)."""

import hashlib
import hmac
import json
import os
import random
import tempfile
import time
import unittest
import uuid
from pathlib import Path

import harness
import zmq

TOTAL = 10_000


class HostileInput(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.tmp = Path(tempfile.mkdtemp(prefix="chernel-hostile-"))
        cls.km, cls.kc = harness.start_kernel(cwd=cls.tmp)

    @classmethod
    def tearDownClass(cls):
        harness.stop_kernel(cls.km, cls.kc)

    def frames(self, msg_type, content, key, session="hostile", header_extra=None):
        header = {
            "msg_id": uuid.uuid4().hex,
            "msg_type": msg_type,
            "session": session,
            "username": "test",
            "date": "2024-01-01T00:00:00Z",
            "version": "5.3",
        }
        header.update(header_extra or {})
        parts = [json.dumps(p).encode() for p in (header, {}, {}, content)]
        return parts, self.sign(key, parts)

    @staticmethod
    def sign(key, parts):
        mac = hmac.new(key, digestmod=hashlib.sha256)
        for p in parts:
            mac.update(p)
        return mac.hexdigest().encode()

    def test_ten_thousand_bad_messages_do_not_execute_or_kill_the_kernel(self):
        key = self.km.session.key
        self.assertTrue(key, "the kernel must run with a signing key")
        marker = self.tmp / "executed-by-a-bad-message"
        replay_marker = self.tmp / "replayed"
        evil = f'import {{ appendFileSync }} from "node:fs"; appendFileSync({json.dumps(str(marker))}, "x")'
        count_before = harness.run(self.kc, "1")[0]["execution_count"]

        ctx = zmq.Context()
        sockets = {}
        for name in ("shell", "control", "stdin"):
            s = ctx.socket(zmq.DEALER)
            s.linger = 0
            s.connect(f"tcp://127.0.0.1:{getattr(self.km, name + '_port')}")
            sockets[name] = s
        rng = random.Random(20240601)
        delim = b"<IDS|MSG>"
        sent = 0

        def send(channel, frames):
            nonlocal sent
            sockets[channel].send_multipart(frames)
            sent += 1

        execute = {"code": evil, "silent": False, "store_history": True, "user_expressions": {}, "allow_stdin": False}
        channels = ["shell", "control", "stdin"]

        # 1. wrong key (2,500)
        for _ in range(2500):
            parts, _sig = self.frames("execute_request", execute, key)
            send(rng.choice(channels), [delim, self.sign(b"not-the-key", parts), *parts])
        # 2. missing or malformed signature (1,000)
        for i in range(1000):
            parts, sig = self.frames("execute_request", execute, key)
            bad = [b"", sig[:-1], sig + b"0", sig.upper(), b"\x00" * 64][i % 5]
            send(rng.choice(channels), [delim, bad, *parts])
        # 3. truncated or unframed (2,000)
        for i in range(2000):
            parts, sig = self.frames("execute_request", execute, key)
            full = [delim, sig, *parts]
            kind = i % 4
            if kind == 0:
                frames = full[: rng.randint(1, 5)]
            elif kind == 1:
                frames = [sig, *parts]  # no delimiter
            elif kind == 2:
                frames = [delim, sig, parts[0][: len(parts[0]) // 2], *parts[1:]]  # cut frame, stale signature
            else:
                frames = [os.urandom(rng.randint(0, 64)) for _ in range(rng.randint(1, 8))]
            send(rng.choice(channels), frames)
        # 4. garbage JSON, correctly signed (1,500)
        for i in range(1500):
            _parts, _ = self.frames("execute_request", execute, key)
            garbage = [b"{", b"not json", b"\xff\xfe", b'{"msg_type": ', b"[1, 2", b"nan", b""][i % 7]
            parts = list(_parts)
            parts[i % 4] = garbage
            send(rng.choice(channels), [delim, self.sign(key, parts), *parts])
        # 5. wrong types, correctly signed (1,000)
        wrong = [
            ("execute_request", {"code": 12345}),
            ("execute_request", {"code": ["a"]}),
            ("execute_request", {"code": evil, "silent": "yes"}),
            ("execute_request", {"code": evil, "store_history": 1}),
            ("execute_request", {"code": evil, "allow_stdin": "no"}),
            ("complete_request", {"code": 5, "cursor_pos": "x"}),
            ("inspect_request", {"code": None}),
            ("comm_open", {"comm_id": 7, "target_name": None}),
            ("comm_msg", {"comm_id": "nope", "data": "x"}),
            ("no_such_request", {"code": evil}),
        ]
        for i in range(1000):
            msg_type, content = wrong[i % len(wrong)]
            channel = "shell" if i % 3 else rng.choice(channels)
            if i % 50 == 0:  # header and content that are not objects, or header without msg_type
                parts = [json.dumps(x).encode() for x in (["header"], {}, {}, "content")]
                if i % 100 == 0:
                    parts[0] = json.dumps({"msg_id": "x", "msg_type": 3}).encode()
                send(channel, [delim, self.sign(key, parts), *parts])
                continue
            parts, sig = self.frames(msg_type, content, key)
            send(channel, [delim, sig, *parts])
        # 6. one valid request, then 2,000 replays of its exact frames (duplicate signature)
        once = f'import {{ appendFileSync }} from "node:fs"; appendFileSync({json.dumps(str(replay_marker))}, "x")'
        parts, sig = self.frames("execute_request", {**execute, "code": once}, key)
        valid = [delim, sig, *parts]
        sockets["shell"].send_multipart(valid)
        for _ in range(TOTAL - sent):
            send("shell", valid)

        self.assertEqual(sent, TOTAL)
        # Everything sent on shell before this request has been handled once it is answered.
        final, _ = self.frames("kernel_info_request", {}, key)
        sockets["shell"].send_multipart([delim, self.sign(key, final), *final])
        deadline = time.monotonic() + 120
        answered = False
        while time.monotonic() < deadline and not answered:
            if sockets["shell"].poll(1000):
                reply = sockets["shell"].recv_multipart()
                header = json.loads(reply[reply.index(delim) + 2])
                answered = header["msg_type"] == "kernel_info_reply"
        ctx.destroy(linger=0)
        self.assertTrue(answered, "the kernel stopped answering on shell")

        self.assertTrue(self.km.is_alive())
        self.assertFalse(marker.exists(), "a bad message was executed")
        self.assertEqual(replay_marker.read_text(), "x", "the valid message ran once and no replay ran")
        # Only our own cells and the one valid request counted as executions.
        reply, _ = harness.run(self.kc, "2 + 2")
        self.assertEqual(reply["status"], "ok")
        self.assertEqual(reply["execution_count"], count_before + 2)


if __name__ == "__main__":
    unittest.main()
