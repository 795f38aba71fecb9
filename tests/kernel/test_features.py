"""The kernel's execution, display, comm, stdin and install features, driven through Debian's
jupyter_client against the real kernel (one kernel for the class, started in a folder that holds
npm packages "installed beside the notebook")."""

import json
import os
import struct
import subprocess
import tempfile
import time
import unittest
from pathlib import Path

import harness

KERNEL_DIST = harness.ROOT / "dist" / "kernel"


def write_packages(root: Path):
    """Two tiny local packages: a CommonJS one and an ESM-only one (exports with 'import' only)."""
    cjs = root / "node_modules" / "notebook-cjs"
    cjs.mkdir(parents=True)
    (cjs / "package.json").write_text(json.dumps({"name": "notebook-cjs", "version": "1.0.0", "main": "main.js"}))
    (cjs / "main.js").write_text("exports.triple = (x) => 3 * x;\nexports.label = 'cjs';\n")
    esm = root / "node_modules" / "notebook-esm"
    esm.mkdir(parents=True)
    (esm / "package.json").write_text(
        json.dumps({"name": "notebook-esm", "version": "1.0.0", "type": "module", "exports": {".": {"import": "./index.js"}}})
    )
    (esm / "index.js").write_text("export const square = (x) => x * x;\nexport default 'esm default';\n")


class Features(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.tmp = Path(tempfile.mkdtemp(prefix="chernel-features-"))
        write_packages(cls.tmp)
        cls.km, cls.kc = harness.start_kernel(cwd=cls.tmp)

    @classmethod
    def tearDownClass(cls):
        harness.stop_kernel(cls.km, cls.kc)

    def value(self, code):
        return harness.value(self.kc, code)

    def shell(self, msg_type, content):
        msg = self.kc.session.msg(msg_type, content)
        self.kc.shell_channel.send(msg)
        return msg["header"]["msg_id"]

    # --- execution -------------------------------------------------------------------------------
    def test_state_persists_and_names_can_be_declared_again(self):
        self.value("const width: number = 3\nlet items = [1, 2]\nfunction area(h: number) { return width * h }\nclass Box { constructor(public side = 2) {} }")
        self.assertEqual(self.value("area(4) + items.length + new Box().side"), "16")
        self.value("const width = 10")  # a notebook user re-runs a cell with a new value
        self.assertEqual(self.value("area(4)"), "40")
        self.value("function area(h: number) { return -h }")
        self.assertEqual(self.value("area(4)"), "-4")
        self.assertEqual(self.value("const [first, ...rest] = items; ({first, rest})"), "{ first: 1, rest: [ 2 ] }")

    def test_top_level_await(self):
        self.assertEqual(self.value("const later = await new Promise<number>((r) => setTimeout(() => r(5), 50)); later * 2"), "10")
        self.assertEqual(self.value("later"), "5")

    def test_import_of_packages_installed_beside_the_notebook(self):
        self.assertEqual(self.value("import { triple, label } from 'notebook-cjs'; [triple(2), label]"), "[ 6, 'cjs' ]")
        self.assertEqual(self.value("import word, { square } from 'notebook-esm'\n[square(3), word]"), "[ 9, 'esm default' ]")
        self.assertEqual(self.value("square(4)"), "16")  # imported names persist too
        self.assertEqual(self.value("const m = await import('notebook-esm'); m.square(5)"), "25")
        reply, _ = harness.run(self.kc, "import { nothing } from 'not-installed-anywhere'")
        self.assertEqual(reply["status"], "error")
        self.assertIn("not-installed-anywhere", reply["evalue"])

    def test_traceback_points_at_cell_lines(self):
        reply, outputs = harness.run(self.kc, "interface Spec {\n  n: number\n}\n\nfunction explode(s: Spec) {\n  if (s.n > 1) throw new RangeError(`n too large: ${s.n}`)\n}\n")
        self.assertEqual(reply["status"], "ok")
        definition = reply["execution_count"]
        reply, outputs = harness.run(self.kc, "const spec: Spec = { n: 3 }\n\nexplode(spec)")
        self.assertEqual(reply["status"], "error")
        self.assertEqual(reply["ename"], "RangeError")
        text = "\n".join(reply["traceback"])
        self.assertIn(f"at explode (In [{definition}], line 6)", text)
        self.assertIn(f"In [{reply['execution_count']}], line 3", text)
        self.assertEqual([m for m, _, _ in outputs if m == "error"], ["error"])

    def test_syntax_error_names_the_line(self):
        reply, _ = harness.run(self.kc, "const ok = 1\nconst = 2")
        self.assertEqual(reply["ename"], "SyntaxError")
        self.assertIn("line 2", "\n".join(reply["traceback"]))

    def test_stop_on_error_aborts_queued_cells(self):
        marker = self.tmp / "aborted-cell-ran"
        first = self.kc.execute("throw new Error('first fails')")
        second = self.kc.execute(f"import {{ writeFileSync }} from 'node:fs'; writeFileSync({json.dumps(str(marker))}, 'ran')")
        self.assertEqual(harness.shell_reply(self.kc, first)["content"]["status"], "error")
        self.assertEqual(harness.shell_reply(self.kc, second)["content"]["status"], "aborted")
        self.assertFalse(marker.exists())
        first = self.kc.execute("throw new Error('fails, but carry on')", stop_on_error=False)
        second = self.kc.execute("'ran'")
        harness.shell_reply(self.kc, first)
        self.assertEqual(harness.shell_reply(self.kc, second)["content"]["status"], "ok")

    def test_silent_and_store_history(self):
        count = harness.run(self.kc, "0")[0]["execution_count"]
        reply, outputs = harness.run(self.kc, "const hidden = 41; hidden + 1", silent=True)
        self.assertEqual(reply["status"], "ok")
        self.assertEqual([m for m, _, _ in outputs], [])  # no execute_input, no execute_result
        reply, outputs = harness.run(self.kc, "hidden", store_history=False)
        self.assertEqual(harness.result_text(outputs), "41")
        self.assertEqual(harness.run(self.kc, "0")[0]["execution_count"], count + 1)

    def test_user_expressions(self):
        reply, _ = harness.run(self.kc, "const ux = 6", user_expressions={"double": "ux * 2", "bad": "nope.x"})
        self.assertEqual(reply["user_expressions"]["double"]["data"]["text/plain"], "12")
        self.assertEqual(reply["user_expressions"]["bad"]["status"], "error")

    def test_input_request_on_stdin(self):
        msg_id = self.kc.execute("const who = await input('name? ');\n`hello ${who}`", allow_stdin=True)
        request = self.kc.get_stdin_msg(timeout=20)
        self.assertEqual(request["msg_type"], "input_request")
        self.assertEqual(request["content"]["prompt"], "name? ")
        self.kc.input("Ada")
        reply = harness.shell_reply(self.kc, msg_id)
        self.assertEqual(reply["content"]["status"], "ok")
        self.assertEqual(self.value("who"), "'Ada'")
        reply, _ = harness.run(self.kc, "await input('no stdin here')", allow_stdin=False)
        self.assertEqual(reply["status"], "error")
        self.assertIn("allow_stdin", reply["evalue"])

    # --- display ---------------------------------------------------------------------------------
    def test_display_and_update_in_place(self):
        reply, outputs = harness.run(self.kc, "const h = display('first'); h.update('second'); display(1, {displayId: h.displayId, update: true})")
        kinds = [(m, c["transient"]["display_id"], c["data"]["text/plain"]) for m, c, _ in outputs if "display" in m]
        display_id = kinds[0][1]
        self.assertEqual(kinds, [("display_data", display_id, "'first'"), ("update_display_data", display_id, "'second'"), ("update_display_data", display_id, "1")])

    def test_progress_bar_updates_in_place_and_ends_with_the_result(self):
        code = (
            "const bar = progress('sweep', 4)\n"
            "for (let i = 1; i <= 4; i++) { await new Promise((r) => setTimeout(r, 120)); bar.update(i) }\n"
            "bar.finish({kind: 'chern', checks: {minGap: 0.5, grid: [24, 24], warnings: []}, chern: -1})"
        )
        reply, outputs = harness.run(self.kc, code)
        self.assertEqual(reply["status"], "ok")
        shown = [(m, c) for m, c, _ in outputs if m in ("display_data", "update_display_data")]
        self.assertEqual(shown[0][0], "display_data")
        self.assertIn("<progress", shown[0][1]["data"]["text/html"])
        ids = {c["transient"]["display_id"] for _, c in shown}
        self.assertEqual(len(ids), 1)
        self.assertGreaterEqual(len(shown), 4)  # start, updates, final
        self.assertTrue(any("100%" in c["data"]["text/plain"] for _, c in shown[:-1]))
        final = shown[-1][1]["data"]
        self.assertIn("chern: -1", final["text/plain"])
        self.assertIn("24×24", final["text/html"])

    def test_engine_results_and_models_display_as_summaries(self):
        model = (
            "({format: 'chernel.model', version: 1, name: 'two-site chain', periodic: 1, vectors: [[1]], "
            "orbitals: [{label: 'A', position: [0]}, {label: 'B', position: [0.5]}], "
            "parameters: {v: {default: 0.5, range: [0, 2], doc: 'intracell hopping'}}, "
            "terms: [{from: 'A', to: 'B', cell: [0], amplitude: 'v'}]})"
        )
        _, outputs = harness.run(self.kc, model)
        shown = [c["data"] for m, c, _ in outputs if m in ("display_data", "execute_result")]
        data = shown[0]
        self.assertIn("model two-site chain", data["text/plain"])
        # Then a picture of its lattice: three cells of the chain, its bond, the unit cell.
        self.assertEqual(sorted(shown[1]), ["application/vnd.plotly.v1+json", "image/png", "text/plain"])
        self.assertIn("lattice figure: 2 orbitals, 1 hopping from the home cell", shown[1]["text/plain"])
        self.assertIn("<table", data["text/html"])
        self.assertIn("intracell hopping", data["text/html"])
        gapless = "({kind: 'chern', checks: {minGap: 0, minGapAt: [0, 3.14159], grid: [12, 12], warnings: ['gap closes at k = (0, pi)'], gapless: true}, chern: null})"
        _, outputs = harness.run(self.kc, gapless)
        data = outputs[-1][1]["data"]
        self.assertIn("chern: null", data["text/plain"])
        self.assertIn("gapless", data["text/plain"])
        self.assertIn("gap closes at k = (0, pi)", data["text/html"])

    def test_every_plottable_result_shows_a_summary_and_its_figure_with_a_picture(self):
        cases = {
            "bands": "compute({kind: 'bands', model: qwz(), params: {u: -1}})",
            "ribbon": "compute({kind: 'ribbon', model: qwz(), direction: 0, width: 10, params: {u: -1}})",
            "curvature": "compute({kind: 'curvature', model: haldane(), grid: 16, bands: 1})",
            "wannier-flow": "compute({kind: 'wannier-flow', model: kaneMele(), grid: [16, 8], bands: 2})",
            "phase-map": "compute({kind: 'phase-map', model: qwz(), quantity: 'chern', grid: 8, axes: [{param: 'u', from: -3, to: 3, count: 5}]})",
            "gap": "compute({kind: 'gap', model: qwz(), grid: 12, params: {u: -1}})",
        }
        for kind, code in cases.items():
            with self.subTest(kind=kind):
                summary, figure = harness.summary_and_figure(self, self.kc, code)
                self.assertIn(f"{kind} result", summary["text/plain"])
                self.assertIn("<table", summary["text/html"])
                # No HTML beside the figure: a viewer showing one type per output shows the picture.
                self.assertEqual(sorted(figure), ["application/vnd.plotly.v1+json", "image/png", "text/plain"])
                self.assertEqual(harness.png_size(figure["image/png"]), (760, 480))
                self.assertTrue(figure["application/vnd.plotly.v1+json"]["data"])
        # A result without a figure shows its summary alone.
        _, outputs = harness.run(self.kc, "compute({kind: 'chern', model: qwz(), params: {u: -1}, bands: 1})")
        self.assertEqual([m for m, _, _ in outputs if m in ("display_data", "execute_result")], ["execute_result"])
        # Its summary says what was proven (the gap certificate) and whether the integer is certified.
        summary = [c for m, c, _ in outputs if m == "execute_result"][0]["data"]["text/plain"]
        self.assertRegex(summary, r"gap proof: proven: at least [0-9.e+-]+ everywhere \(\d+ samples on \d+x\d+ lines\)")
        self.assertIn("certified: yes", summary)

    def test_display_of_a_result_updates_summary_and_figure_in_place(self):
        reply, outputs = harness.run(self.kc, "const shown = display(compute({kind: 'bands', model: qwz(), params: {u: -1}}))\nshown.update(compute({kind: 'bands', model: qwz(), params: {u: 1}}))")
        self.assertEqual(reply["status"], "ok")
        ids = [(m, c["transient"]["display_id"]) for m, c, _ in outputs if "display" in m]
        first = ids[0][1]
        self.assertEqual(ids, [("display_data", first), ("display_data", f"{first}-1"), ("update_display_data", first), ("update_display_data", f"{first}-1")])

    def test_widget_output_carries_its_state_and_a_picture(self):
        reply, outputs = harness.run(self.kc, "const cw = show(qwz(), {kind: 'curvature', grid: 16, bands: 1}); cw", timeout=60)
        data = [c["data"] for m, c, _ in outputs if m == "execute_result"][0]
        view = data["application/vnd.jupyter.widget-view+json"]
        saved = data["application/vnd.chernel.widget-state+json"]
        self.assertEqual(saved["model_id"], view["model_id"])
        self.assertEqual(saved["model_name"], "DiagnosticModel")
        self.assertEqual(saved["state"]["values"], {"u": -1})
        # The result's arrays travel as base64 buffers beside their paths (widget state schema 2).
        self.assertIn(["result", "values", "buffer"], [b["path"] for b in saved["buffers"]])
        self.assertEqual(harness.png_size(data["image/png"]), (760, 480))
        # Moving the controls from a cell shows no second view; the Chern number has its name.
        reply, outputs = harness.run(self.kc, "cw.setValues({u: 1})")
        self.assertEqual(reply["status"], "ok")
        self.assertEqual([m for m, _, _ in outputs if m in ("display_data", "execute_result")], [])
        # QWZ, PRB 74, 085308 (2006): C = +1 at u = -1 (lower band; references.md convention).
        self.assertEqual(self.value("cw.result.chern"), "1")

    def test_traceback_collapses_engine_frames_and_writes_no_machine_path(self):
        reply, _ = harness.run(self.kc, "function ask() { return compute({kind: 'chern', model: qwz(), params: {u: 9}}) }\nask()")
        self.assertEqual(reply["status"], "error")
        text = "\n".join(reply["traceback"]) + reply["evalue"]
        self.assertIn("at compute (chernel engine, in checkParameterValues)", text)
        self.assertIn("at ask (In [", text)
        for private in {str(harness.ROOT), os.path.expanduser("~"), "file://", "dist/src", "node:internal"}:
            self.assertNotIn(private, text)
        self.assertEqual(len([l for l in reply["traceback"] if "chernel engine" in l]), 1)
        # An error thrown later, outside any cell's run, is printed without the machine's paths too.
        reply, outputs = harness.run(self.kc, "setTimeout(() => compute({kind: 'chern', model: qwz(), params: {u: 9}}), 10)\nawait new Promise((r) => setTimeout(r, 200))")
        printed = "".join(c.get("text", "") for m, c, _ in outputs if m == "stream")
        self.assertIn("Uncaught error in background code: ModelError: params.u", printed)
        for private in {str(harness.ROOT), os.path.expanduser("~"), "file://"}:
            self.assertNotIn(private, printed)

    def test_a_long_phase_map_shows_a_progress_bar_with_the_time_left(self):
        # A fine map takes seconds (well under a millisecond a point, thousands of points).
        code = "compute({kind: 'phase-map', model: haldane(), quantity: 'chern', grid: 24, axes: [{param: 'phi', from: -3, to: 3, count: 80}, {param: 'M', from: -0.6, to: 0.6, count: 60}]})"
        reply, outputs = harness.run(self.kc, code, timeout=120)
        self.assertEqual(reply["status"], "ok")
        bars = [(m, c["data"]["text/plain"]) for m, c, _ in outputs if "display" in m and "<progress" in c["data"].get("text/html", "")]
        self.assertTrue(bars, "no progress bar for a computation of several seconds")
        self.assertEqual(bars[0][0], "display_data")
        self.assertTrue(any("left" in text for _, text in bars), bars)
        self.assertIn("done", bars[-1][1])
        # The result follows as usual: summary and figure.
        self.assertIn("phase-map result", [c["data"]["text/plain"] for m, c, _ in outputs if m == "display_data" and "<table" in c["data"].get("text/html", "")][0])

    def test_any_long_computation_shows_how_long_it_has_run(self):
        # A fine curvature map takes seconds; its share done is unknown, so the bar says the time so far.
        code = "const fine = compute({kind: 'curvature', model: kaneMele(), grid: [1200, 1200], bands: 2}); fine.grid"
        reply, outputs = harness.run(self.kc, code, timeout=120)
        self.assertEqual(reply["status"], "ok")
        bars = [c["data"]["text/plain"] for m, c, _ in outputs if "display" in m and "<progress" in c["data"].get("text/html", "")]
        self.assertTrue(bars, "no progress bar for a computation of several seconds")
        self.assertTrue(any("so far" in text for text in bars), bars)
        self.assertRegex(bars[-1], r"done · in \d+ s$")

    # --- completion and inspection ---------------------------------------------------------------
    def test_complete_variables_and_members(self):
        self.value("const myTable = { alpha: 1, beta: 2 }")
        msg_id = self.kc.complete("myTa")
        content = harness.shell_reply(self.kc, msg_id)["content"]
        self.assertEqual(content["matches"], ["myTable"])
        code = "const z = myTable.al"
        msg_id = self.kc.complete(code, len(code))
        content = harness.shell_reply(self.kc, msg_id)["content"]
        self.assertEqual(content["matches"], ["alpha"])
        self.assertEqual((content["cursor_start"], content["cursor_end"]), (len(code) - 2, len(code)))

    def test_inspect_user_function_and_engine_export(self):
        self.value("function scale(x: number, by = 2) { return x * by }")
        msg_id = self.kc.inspect("scale(", 6)
        content = harness.shell_reply(self.kc, msg_id)["content"]
        self.assertTrue(content["found"])
        self.assertIn("function scale(x, by = 2)", content["data"]["text/plain"])
        msg_id = self.kc.inspect("validateModel", 3)
        content = harness.shell_reply(self.kc, msg_id, timeout=60)["content"]
        self.assertIn("validateModel(", content["data"]["text/plain"])

    # --- comms -----------------------------------------------------------------------------------
    def test_comms_both_directions(self):
        comms = json.dumps(str(KERNEL_DIST / "comms.js"))
        self.value(
            f"import {{ registerCommTarget, openComm }} from {comms}\n"
            "registerCommTarget('chernel.test', (comm, open) => {\n"
            "  comm.send({opened: open.data.hello});\n"
            "  comm.onMessage((msg) => comm.send({doubled: (msg.data.n as number) * 2}, {buffers: [new Float64Array([msg.data.n as number, 1.5])]}));\n"
            "})"
        )
        comm_id = "c0ffee"
        open_id = self.shell("comm_open", {"comm_id": comm_id, "target_name": "chernel.test", "data": {"hello": "hi"}})
        out = harness.collect(self.kc, open_id)
        self.assertEqual([(m, c["data"]) for m, c, _ in out], [("comm_msg", {"opened": "hi"})])
        info_id = self.shell("comm_info_request", {"target_name": "chernel.test"})
        self.assertIn(comm_id, harness.shell_reply(self.kc, info_id)["content"]["comms"])
        msg_id = self.shell("comm_msg", {"comm_id": comm_id, "data": {"n": 21}})
        out = harness.collect(self.kc, msg_id)
        self.assertEqual(out[0][1]["data"], {"doubled": 42})
        buffers = out[0][2]["buffers"]
        self.assertEqual(struct.unpack("<2d", bytes(buffers[0])), (21.0, 1.5))
        # Opening on an unknown target is refused with comm_close and nothing else (messaging spec):
        # front ends probe targets, and a probe must not print into the user's cells.
        bad_id = self.shell("comm_open", {"comm_id": "b4d", "target_name": "no.such.target", "data": {}})
        out = harness.collect(self.kc, bad_id)
        self.assertEqual([(m, c.get("comm_id")) for m, c, _ in out if m != "status"], [("comm_close", "b4d")])
        # A message for that closed comm is ignored, quietly.
        stray_id = self.shell("comm_msg", {"comm_id": "b4d", "data": {"n": 1}})
        self.assertEqual([m for m, _, _ in harness.collect(self.kc, stray_id) if m != "status"], [])
        # The kernel side opens a comm.
        _, out = harness.run(self.kc, "const k = openComm('chernel.frontend', {state: 1}, {metadata: {version: '2.1.0'}}); k.id")
        opened = [(c, msg) for m, c, msg in out if m == "comm_open"]
        self.assertEqual(opened[0][0]["target_name"], "chernel.frontend")
        self.assertEqual(opened[0][1]["metadata"], {"version": "2.1.0"})

    # --- command line ----------------------------------------------------------------------------
    def test_install_and_remove_kernelspec(self):
        prefix = Path(tempfile.mkdtemp(prefix="chernel-install-"))
        subprocess.run(["node", str(harness.CLI), "install", "--prefix", str(prefix)], check=True, capture_output=True)
        spec_dir = prefix / "share" / "jupyter" / "kernels" / "chernel"
        spec = json.loads((spec_dir / "kernel.json").read_text())
        node, kernel = spec["argv"][0], spec["argv"][1]
        self.assertTrue(os.path.isabs(node) and os.access(node, os.X_OK))
        self.assertTrue(os.path.isabs(kernel) and os.path.exists(kernel))
        self.assertEqual(spec["argv"][2:], ["start", "{connection_file}"])
        self.assertEqual(spec["language"], "typescript")
        self.assertTrue(spec["display_name"])
        for size in (32, 64):
            png = (spec_dir / f"logo-{size}x{size}.png").read_bytes()
            self.assertEqual(png[:8], b"\x89PNG\r\n\x1a\n")  # PNG signature (PNG specification, section 5.2)
            self.assertEqual(png[12:16], b"IHDR")
            self.assertEqual(struct.unpack(">II", png[16:24]), (size, size))
        # The prebuilt widget extension beside it, found as JupyterLab 4 finds federated extensions
        # (Debian's jupyterlab_server, the same function that fills the page's federated_extensions).
        from jupyterlab_server.config import get_federated_extensions
        extensions = prefix / "share" / "jupyter" / "labextensions"
        found = get_federated_extensions([str(extensions)])
        self.assertEqual(list(found), ["chernel-widgets"])
        self.assertTrue((extensions / "chernel-widgets" / found["chernel-widgets"]["jupyterlab"]["_build"]["load"]).is_file())
        self.assertIn("chernel remove", found["chernel-widgets"]["install"]["uninstallInstructions"])
        subprocess.run(["node", str(harness.CLI), "remove", "--prefix", str(prefix)], check=True, capture_output=True)
        self.assertFalse(spec_dir.exists())
        self.assertFalse((extensions / "chernel-widgets").exists())
        bad = subprocess.run(["node", str(harness.CLI), "instal"], capture_output=True, text=True)
        self.assertEqual(bad.returncode, 2)
        self.assertIn('unknown command "instal"', bad.stderr)

    def test_export_html_of_a_notebook_with_widgets(self):
        notebook = harness.ROOT / "notebooks-demo" / "01-coupled-wires.ipynb"
        # Saved as a lab with default settings saves: each widget's state in its own output.
        outputs = [o.get("data", {}) for c in json.loads(notebook.read_text())["cells"] for o in c.get("outputs", [])]
        state = [d["application/vnd.chernel.widget-state+json"]["model_id"] for d in outputs if "application/vnd.chernel.widget-state+json" in d]
        self.assertTrue(state)
        page = Path(tempfile.mkdtemp(prefix="chernel-export-")) / "wires.html"
        subprocess.run(["node", str(harness.CLI), "export-html", str(notebook), "-o", str(page)], check=True, capture_output=True)
        html = page.read_text()
        self.assertIn("application/vnd.jupyter.widget-state+json", html)
        for model_id in state:
            self.assertIn(model_id, html)
        missing = subprocess.run(["node", str(harness.CLI), "export-html", str(page.parent / "absent.ipynb")], capture_output=True, text=True)
        self.assertNotEqual(missing.returncode, 0)
        self.assertIn("absent.ipynb", missing.stderr)


if __name__ == "__main__":
    unittest.main()
