"""The edge and surface kinds in a real kernel, through Debian's jupyter_client: each result shows its
summary and its figure with a picture, and the two surface widgets carry their state and a picture.
Physics: Qi, Wu & Zhang, PRB 74, 085308 (2006): at u = -1 (C = +1) each QWZ edge carries one
chiral mode, opposite on the two edges; the two-band Weyl model has nodes at (0, 0, +-k0) of
opposite chirality (catalogue, common practice)."""

import unittest

import harness


class Surface(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.km, cls.kc = harness.start_kernel()

    @classmethod
    def tearDownClass(cls):
        harness.stop_kernel(cls.km, cls.kc)

    def test_each_kind_shows_a_summary_and_its_figure_with_a_picture(self):
        cases = {
            "surface-spectrum": ("compute({kind: 'surface-spectrum', model: qwz(), params: {u: -1}, cut: 1, energyCount: 41})", "Edge spectral function"),
            "surface-map": ("compute({kind: 'surface-map', model: twoBandWeyl(), cut: 0, grid: 24, energy: 0})", "Surface map at E = 0"),
            "slab-spectrum": ("compute({kind: 'slab-spectrum', model: cubicTI(), cut: 2, width: 6, nk: 4})", "Slab spectrum"),
            "bulk-boundary": ("compute({kind: 'bulk-boundary', model: qwz(), params: {u: -1}, cut: 1})", "Bulk–boundary check"),
        }
        for kind, (code, title) in cases.items():
            with self.subTest(kind=kind):
                summary, figure = harness.summary_and_figure(self, self.kc, code)
                self.assertIn(f"{kind} result", summary["text/plain"])
                self.assertEqual(sorted(figure), ["application/vnd.plotly.v1+json", "image/png", "text/plain"])
                self.assertEqual(harness.png_size(figure["image/png"]), (760, 480))
                self.assertIn(title, figure["application/vnd.plotly.v1+json"]["layout"]["title"]["text"])
                self.assertRegex(figure["text/plain"], rf"^{kind} figure: .*cut \(")
        self.assertEqual(harness.value(self.kc, "compute({kind: 'bulk-boundary', model: qwz(), params: {u: -1}, cut: 1}).verdict"), "'agree'")

    def test_surface_widgets_carry_their_state_and_a_picture(self):
        for code, buffer in [
            ("show(qwz(), {kind: 'surface-spectrum', cut: 1, nk: 41, energyCount: 30})", ["result", "bottom", "buffer"]),
            ("show(twoBandWeyl(), {kind: 'surface-map', cut: 0, grid: 16, energy: 0})", ["result", "top", "buffer"]),
        ]:
            with self.subTest(code=code):
                reply, outputs = harness.run(self.kc, code, timeout=60)
                self.assertEqual(reply["status"], "ok")
                data = [c["data"] for m, c, _ in outputs if m == "execute_result"][0]
                saved = data["application/vnd.chernel.widget-state+json"]
                self.assertEqual(saved["model_id"], data["application/vnd.jupyter.widget-view+json"]["model_id"])
                self.assertEqual(saved["state"]["error"], "")
                self.assertIn(buffer, [b["path"] for b in saved["buffers"]])
                self.assertEqual(harness.png_size(data["image/png"]), (760, 480))
        # The nodes of the widget's result, from the kernel's copy of it.
        chiralities = harness.value(self.kc, "show(twoBandWeyl(), {kind: 'surface-map', cut: 0, grid: 8, energy: 0}).result.nodes.map((n) => n.chirality).join(' ')")
        self.assertEqual(chiralities, "'1 -1'")
        reply, outputs = harness.run(self.kc, "show(twoBandWeyl(), {kind: 'surface-map', cut: 0, energi: 0})")
        self.assertEqual(reply["status"], "error")
        self.assertIn('did you mean "energy"', reply["evalue"])


if __name__ == "__main__":
    unittest.main()
