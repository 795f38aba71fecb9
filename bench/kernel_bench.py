"""Kernel figures for `npm run bench` (called by bench/kernel.ts): start to first kernel_info_reply,
and the round trip of a trivial execute_request (median of 200), for chernel and, as the
reference in the same run, Debian's python3-ipykernel. Both are driven by the same client
(Debian's jupyter_client). Prints one JSON object."""

import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
prefix = tempfile.mkdtemp(prefix="chernel-bench-")
subprocess.run(["node", str(ROOT / "bin" / "chernel.js"), "install", "--prefix", prefix], check=True, capture_output=True)
os.environ["JUPYTER_PATH"] = os.path.join(prefix, "share", "jupyter")

from jupyter_client.manager import KernelManager  # noqa: E402

STARTS = int(os.environ.get("CHERNEL_BENCH_STARTS", "5"))
ROUND_TRIPS = 200


def reply_to(kc, msg_id, timeout=60):
    while True:
        msg = kc.get_shell_msg(timeout=timeout)
        if msg["parent_header"].get("msg_id") == msg_id:
            return msg


def start_time(kernel_name):
    km = KernelManager(kernel_name=kernel_name)
    t0 = time.perf_counter()
    km.start_kernel()
    kc = km.client()
    kc.start_channels()
    reply_to(kc, kc.kernel_info())  # queued by ZeroMQ until the kernel binds its sockets
    elapsed = time.perf_counter() - t0
    return elapsed, km, kc


def measure(kernel_name, code):
    print(f"bench: {kernel_name}", file=sys.stderr, flush=True)
    starts = []
    for i in range(STARTS):
        elapsed, km, kc = start_time(kernel_name)
        starts.append(elapsed)
        if i < STARTS - 1:
            kc.stop_channels()
            km.shutdown_kernel(now=True)
    kc.wait_for_ready(timeout=60)
    for _ in range(10):  # warm up (first cells load the runtime)
        reply_to(kc, kc.execute(code))
    trips = []
    for _ in range(ROUND_TRIPS):
        t0 = time.perf_counter()
        reply = reply_to(kc, kc.execute(code))
        trips.append(time.perf_counter() - t0)
        assert reply["content"]["status"] == "ok", reply["content"]
    kc.stop_channels()
    km.shutdown_kernel(now=True)
    return {"start_s": statistics.median(starts), "execute_ms": statistics.median(trips) * 1000}


result = {"chernel": measure("chernel", "1 + 1")}
try:
    result["ipykernel"] = measure("python3", "1 + 1")
except Exception as error:  # no ipykernel here: the bench says so instead of inventing a reference
    result["ipykernel"] = None
    result["ipykernel_error"] = str(error)
print(json.dumps(result))
