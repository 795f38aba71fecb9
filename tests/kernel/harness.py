"""Shared set-up for the kernel tests: installs the kernelspec (from the built dist/) under a
temporary prefix, points Jupyter at it, and drives kernels through Debian's jupyter_client.

Importing this module is enough for `KernelManager(kernel_name='chernel')` to find our kernel.
Run with Debian's /usr/bin/python3 after `npm run build`."""

import atexit
import base64
import os
import shutil
import struct
import subprocess
import tempfile
import time
from pathlib import Path
from queue import Empty

ROOT = Path(__file__).resolve().parents[2]
CLI = ROOT / "bin" / "chernel.js"
KERNEL_NAME = "chernel"

_prefix = Path(tempfile.mkdtemp(prefix="chernel-spec-"))
atexit.register(shutil.rmtree, _prefix, ignore_errors=True)
subprocess.run(["node", str(CLI), "install", "--prefix", str(_prefix)], check=True, capture_output=True)
os.environ["JUPYTER_PATH"] = os.pathsep.join(
    [str(_prefix / "share" / "jupyter")] + [p for p in os.environ.get("JUPYTER_PATH", "").split(os.pathsep) if p]
)

from jupyter_client.manager import KernelManager  # noqa: E402  (after JUPYTER_PATH is set)


def start_kernel(cwd=None):
    km = KernelManager(kernel_name=KERNEL_NAME)
    km.start_kernel(cwd=str(cwd) if cwd else None)
    kc = km.client()
    kc.start_channels()
    kc.wait_for_ready(timeout=60)
    return km, kc


def stop_kernel(km, kc):
    kc.stop_channels()
    km.shutdown_kernel(now=False)


def collect(kc, msg_id, timeout=30):
    """iopub messages of one request up to its idle status: [(msg_type, content, msg)]."""
    outputs = []
    deadline = time.monotonic() + timeout
    while True:
        remaining = deadline - time.monotonic()
        if remaining <= 0:
            raise AssertionError(f"no idle status for {msg_id} within {timeout} s")
        try:
            msg = kc.get_iopub_msg(timeout=remaining)
        except Empty:
            continue
        if msg["parent_header"].get("msg_id") != msg_id:
            continue
        if msg["msg_type"] == "status":
            if msg["content"]["execution_state"] == "idle":
                return outputs
            continue
        outputs.append((msg["msg_type"], msg["content"], msg))


def shell_reply(kc, msg_id, timeout=30):
    deadline = time.monotonic() + timeout
    while True:
        reply = kc.get_shell_msg(timeout=max(0.01, deadline - time.monotonic()))
        if reply["parent_header"].get("msg_id") == msg_id:
            return reply


def run(kc, code, timeout=30, **kwargs):
    """Executes a cell and waits for it: (reply content, [(msg_type, content, msg)])."""
    msg_id = kc.execute(code, **kwargs)
    reply = shell_reply(kc, msg_id, timeout)
    return reply["content"], collect(kc, msg_id, timeout)


def result_text(outputs):
    for msg_type, content, _ in outputs:
        if msg_type == "execute_result":
            return content["data"]["text/plain"]
    return None


def value(kc, code, timeout=30):
    """The text/plain result of a cell that must succeed."""
    reply, outputs = run(kc, code, timeout)
    if reply["status"] != "ok":
        raise AssertionError(f"cell failed: {code!r}: {reply.get('ename')}: {reply.get('evalue')}")
    return result_text(outputs)


def png_size(data):
    """Width and height of a base64 PNG (the IHDR chunk: PNG specification, RFC 2083); None when it is no PNG."""
    png = base64.b64decode(data)
    if png[:8] != b"\x89PNG\r\n\x1a\n":
        return None
    return struct.unpack(">II", png[16:24])


def summary_and_figure(test, kc, code, timeout=60):
    """Runs a cell whose value is a result with a figure: its two outputs' data, summary then figure."""
    reply, outputs = run(kc, code, timeout=timeout)
    test.assertEqual(reply["status"], "ok")
    shown = [(m, c["data"]) for m, c, _ in outputs if m in ("display_data", "execute_result")]
    test.assertEqual([m for m, _ in shown], ["display_data", "execute_result"])
    return shown[0][1], shown[1][1]
